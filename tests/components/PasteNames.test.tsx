/**
 * Levels and spaces pasted one per line: the box counts the names, refuses the same name twice
 * with its line before sending, and sends the trimmed names as one list.
 */
import { fireEvent, render, screen, waitFor } from '@testing-library/react-native';
import { PasteNames } from '../../components/setup/PasteNames';

function paste(send: (names: string[]) => Promise<unknown>) {
  render(
    <PasteNames title="Add several levels" subject="a level name" max={80} noun={['level', 'levels']} placeholder="" testID="levels-paste" send={send} />,
  );
}

describe('PasteNames', () => {
  it('sends the pasted names, trimmed and without empty lines, and says how many were added', async () => {
    const sent: string[][] = [];
    paste(async (names) => sent.push(names));
    fireEvent.changeText(screen.getByTestId('levels-paste-input'), ' Level 1 \r\n\r\nLevel 2\nRoof\n');
    expect(screen.getByText('Add 3 levels')).toBeTruthy();
    fireEvent.press(screen.getByTestId('levels-paste-submit'));
    await waitFor(() => expect(screen.getByText('3 levels added.')).toBeTruthy());
    expect(sent).toEqual([['Level 1', 'Level 2', 'Roof']]);
  });

  it('refuses the same name twice with its line, and sends nothing', async () => {
    const sent: string[][] = [];
    paste(async (names) => sent.push(names));
    fireEvent.changeText(screen.getByTestId('levels-paste-input'), 'Level 1\nRoof\nlevel 1');
    fireEvent.press(screen.getByTestId('levels-paste-submit'));
    await waitFor(() => expect(screen.getAllByText(/Line 3: "level 1" is on lines 1 and 3\./).length).toBeGreaterThan(0));
    expect(sent).toEqual([]);
  });
});
