/**
 * Picking a file in the browser tests. Every file field of the web app (FilePicker,
 * PhotoPicker) renders a hidden `<input type=file>` whose testID is the field's with `-input`
 * added; the tests hand it the file's bytes the way a person's choice in the file dialog would.
 */
import type { Page } from 'playwright-core';

/** A file as the browser test hands it to a file field. */
export interface PickedFile {
  name: string;
  mimeType: string;
  buffer: Buffer;
}

/** A CSV as a spreadsheet saves it for another program: UTF-8 with a byte-order mark, CRLF line ends. */
export function csvFile(lines: string[], name: string): PickedFile {
  return { name, mimeType: 'text/csv', buffer: Buffer.from(`\uFEFF${lines.join('\r\n')}\r\n`, 'utf8') };
}

/**
 * Picks `file` in the file field `field` (its testID), then, when `shows` is given, waits for the
 * element with that testID: what the screen shows once it has read the file.
 */
export async function pickFile(page: Page, field: string, file: PickedFile, shows?: string): Promise<void> {
  await page.getByTestId(`${field}-input`).setInputFiles(file);
  if (shows) await page.getByTestId(shows).first().waitFor();
}
