/**
 * The shared form behaviour that keeps words plain: a text box with a limit counts down near it
 * and keeps (and marks) text pasted past it; the banner of a failed submit names the fields whose
 * messages sit at them; and the words for pressing fit the pointer (tap on touch, click with a
 * mouse, select when the device does not say).
 */
import { zodResolver } from '@hookform/resolvers/zod';
import { act, fireEvent, render, screen, waitFor, within } from '@testing-library/react-native';
import { useForm } from 'react-hook-form';
import { Text, View } from 'react-native';
import { z } from 'zod';
import { Comments } from '../../components/correction/Comments';
import { Button } from '../../components/ui/Button';
import { FormBanner } from '../../components/ui/FormBanner';
import { FormSeverity, FormText } from '../../components/ui/FormFields';
import { usePointerWords } from '../../components/ui/usePointerWords';
import { dateOnly, limited, textLimit } from '../../shared/schemas/fields';
import { COMMENT_LIMIT, COMMENT_MAX } from '../../shared/schemas/findings';
import { SEVERITIES } from '../../shared/words';
import { renderWithQueries } from '../support/components';

jest.setTimeout(30_000);

const NOTE = textLimit(100, 'The note');
const schema = z
  .object({
    note: limited(z.string().trim(), NOTE),
    severity: z.enum(SEVERITIES, { error: 'Choose the severity.' }),
    dueOn: dateOnly,
  })
  .strict();

function Sample({ onSend }: { onSend: (v: unknown) => void }) {
  const { control, handleSubmit } = useForm({ resolver: zodResolver(schema), defaultValues: { note: '', dueOn: '' } as never });
  return (
    <View>
      <FormSeverity control={control} name="severity" testID="sample-severity" />
      <FormText control={control} name="dueOn" label="Due date (YYYY-MM-DD)" testID="sample-due" />
      <FormText control={control} name="note" label="Note (optional)" testID="sample-note" limit={NOTE} multiline />
      <FormBanner control={control} testID="sample-error" />
      <Button label="Send" testID="sample-send" onPress={handleSubmit(onSend)} />
    </View>
  );
}

describe('a text box with a limit', () => {
  it('says nothing far from the limit, counts down from 80 %, and says so at the limit', () => {
    render(<Sample onSend={jest.fn()} />);
    const counter = () => screen.getByTestId('sample-note-counter');
    expect(counter().props['aria-live']).toBe('polite');
    fireEvent.changeText(screen.getByTestId('sample-note'), 'x'.repeat(79));
    expect(counter().props.children).toBe('');
    fireEvent.changeText(screen.getByTestId('sample-note'), 'x'.repeat(80));
    expect(counter().props.children).toBe('20 characters left');
    fireEvent.changeText(screen.getByTestId('sample-note'), 'x'.repeat(99));
    expect(counter().props.children).toBe('1 character left');
    fireEvent.changeText(screen.getByTestId('sample-note'), 'x'.repeat(100));
    expect(counter().props.children).toBe('You have reached the limit of 100 characters.');
    expect(screen.queryByTestId('sample-note-error')).toBeNull();
  });

  it('keeps text pasted past the limit and marks it with the schema’s own words, which the submit gives too', async () => {
    const onSend = jest.fn();
    render(<Sample onSend={onSend} />);
    const pasted = 'y'.repeat(130);
    fireEvent.changeText(screen.getByTestId('sample-note'), pasted);
    // Not cut: the box holds all of it, and says by how much it is over before any submit.
    expect(screen.getByTestId('sample-note').props.value).toBe(pasted);
    expect(screen.getByTestId('sample-note').props.maxLength).toBeUndefined();
    expect(screen.getByTestId('sample-note-error').props.children).toBe('The note is at most 100 characters: shorten it by 30.');
    fireEvent.press(screen.getByTestId('sample-send'));
    await waitFor(() => expect(screen.getByTestId('sample-error')).toBeTruthy());
    expect(screen.getByTestId('sample-note-error').props.children).toBe(NOTE.tooLong(130));
    expect(onSend).not.toHaveBeenCalled();
  });

  it('counts down to the comment limit of the shared schema, and never cuts a comment', async () => {
    (globalThis as { fetch: unknown }).fetch = jest.fn(async () => ({ ok: true, status: 200, json: async () => ({ items: [] }), headers: { get: () => null } }));
    renderWithQueries(<Comments jobId="00000000-0000-4000-8000-0000000000a1" findingId="00000000-0000-4000-8000-0000000000f1" timeZone="UTC" />);
    const box = await screen.findByTestId('finding-comment-text');
    expect(box.props.maxLength).toBeUndefined();
    fireEvent.changeText(box, 'z'.repeat(COMMENT_MAX - 5));
    expect(screen.getByTestId('finding-comment-text-counter').props.children).toBe('5 characters left');
    fireEvent.changeText(box, 'z'.repeat(COMMENT_MAX + 12));
    expect(screen.getByTestId('finding-comment-text').props.value).toHaveLength(COMMENT_MAX + 12);
    expect(screen.getByTestId('finding-comment-text-error').props.children).toBe(COMMENT_LIMIT.tooLong(COMMENT_MAX + 12));
  });
});

describe('the banner of a failed submit', () => {
  it('names the fields whose messages sit at them, in the order of the form', async () => {
    render(<Sample onSend={jest.fn()} />);
    expect(screen.queryByTestId('sample-error')).toBeNull();
    fireEvent.changeText(screen.getByTestId('sample-due'), 'next friday');
    fireEvent.press(screen.getByTestId('sample-send'));
    const banner = await screen.findByTestId('sample-error');
    expect(within(banner).getByText('Check 2 fields: Severity, Due date.')).toBeTruthy();
    // Each message sits at its own field.
    expect(screen.getByTestId('sample-severity-error').props.children).toBe('Choose the severity.');
    expect(screen.getByTestId('sample-due-error').props.children).toBe('Enter a date as YYYY-MM-DD.');

    fireEvent.press(screen.getByTestId('sample-severity-major'));
    fireEvent.changeText(screen.getByTestId('sample-due'), '2031-02-03');
    fireEvent.press(screen.getByTestId('sample-send'));
    await waitFor(() => expect(screen.queryByTestId('sample-due-error')).toBeNull(), { timeout: 10_000 });
    expect(screen.queryByTestId('sample-severity-error')).toBeNull();
    expect(screen.queryByTestId('sample-error')).toBeNull();
  });

  it('says a message no field on screen shows, and the form’s own sentence', async () => {
    function Lone() {
      const { control, handleSubmit, setError } = useForm({ resolver: zodResolver(z.object({ unitId: z.string({ error: 'Attach the finding to a unit.' }) })) });
      return (
        <View>
          <FormBanner control={control} testID="lone-error" />
          <Button label="Send" testID="lone-send" onPress={handleSubmit(jest.fn(), () => setError('root', { message: 'That did not save. Try again.' }))} />
        </View>
      );
    }
    render(<Lone />);
    fireEvent.press(screen.getByTestId('lone-send'));
    const banner = await screen.findByTestId('lone-error');
    expect(within(banner).getByText('Attach the finding to a unit.')).toBeTruthy();
    expect(within(banner).getByText('That did not save. Try again.')).toBeTruthy();
  });
});

describe('words for pressing', () => {
  type Listener = () => void;
  const realMatchMedia = (globalThis as { matchMedia?: unknown }).matchMedia;
  afterEach(() => {
    (globalThis as { matchMedia?: unknown }).matchMedia = realMatchMedia;
  });

  /** A pointer the test can change, as a tablet docked to a trackpad would. */
  function fakePointer(initial: 'coarse' | 'fine' | 'none') {
    let pointer = initial;
    const listeners = new Set<Listener>();
    (globalThis as { matchMedia?: unknown }).matchMedia = (query: string) => ({
      matches: query === `(pointer: ${pointer})`,
      addEventListener: (_: string, fn: Listener) => listeners.add(fn),
      removeEventListener: (_: string, fn: Listener) => listeners.delete(fn),
    });
    return {
      set(next: typeof pointer) {
        pointer = next;
        for (const fn of listeners) fn();
      },
    };
  }

  function Hint() {
    const { Press, press } = usePointerWords();
    return <Text testID="hint">{`${Press} a pin to open it, or ${press} Save.`}</Text>;
  }

  it('says tap on a touch screen and click with a mouse, and follows a change of pointer', () => {
    const pointer = fakePointer('coarse');
    render(<Hint />);
    expect(screen.getByTestId('hint').props.children).toBe('Tap a pin to open it, or tap Save.');
    act(() => pointer.set('fine'));
    expect(screen.getByTestId('hint').props.children).toBe('Click a pin to open it, or click Save.');
  });

  it('says select when the device names no pointer, and tap in the phone app (no media queries)', () => {
    fakePointer('none');
    const { unmount } = render(<Hint />);
    expect(screen.getByTestId('hint').props.children).toBe('Select a pin to open it, or select Save.');
    unmount();
    delete (globalThis as { matchMedia?: unknown }).matchMedia;
    render(<Hint />);
    expect(screen.getByTestId('hint').props.children).toBe('Tap a pin to open it, or tap Save.');
  });
});
