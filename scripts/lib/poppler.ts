/**
 * PDF plans are drawn by poppler's pdftoppm and sized with pdfinfo (Debian package
 * poppler-utils). Installed the same way as PostgreSQL and chromium when missing.
 */
import { aptInstall, tryRun } from './run';

export function ensurePdfTools(): void {
  if (tryRun('pdftoppm', ['-v']) && tryRun('pdfinfo', ['-v'])) return;
  aptInstall(['poppler-utils']);
}
