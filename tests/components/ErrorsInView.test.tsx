/**
 * A refused submit brings the first field in error into view: the form's fields carry the form's
 * ref, so react-hook-form focuses the first one in error (the browser scrolls a focused field into
 * view), and a server refusal focuses the first field it names.
 */
import { zodResolver } from '@hookform/resolvers/zod';
import { act, render, screen } from '@testing-library/react-native';
import { useForm } from 'react-hook-form';
import { TextInput } from 'react-native';
import { z } from 'zod';
import { ApiError } from '../../components/api/client';
import { showServerErrors } from '../../components/setup/formErrors';
import { FormQuantity, FormSelect, FormText } from '../../components/ui/FormFields';

const schema = z.object({ name: z.string().min(1, 'Type a name.'), maker: z.string().min(1, 'Type a maker.') });
type Values = z.infer<typeof schema>;
let api: ReturnType<typeof useForm<Values>> | null = null;

function Form() {
  const form = useForm<Values>({ resolver: zodResolver(schema), defaultValues: { name: 'Cassette 24', maker: '' } });
  api = form;
  return (
    <>
      <FormText control={form.control} name="name" label="Name" testID="name" />
      <FormText control={form.control} name="maker" label="Maker" testID="maker" />
    </>
  );
}

describe('errors in view', () => {
  it('focuses the first field in error on a refused submit', async () => {
    const focus = jest.spyOn(TextInput.prototype, 'focus').mockImplementation(function (this: TextInput) {
      focused.push((this.props as { testID?: string }).testID ?? '');
    });
    const focused: string[] = [];
    render(<Form />);
    await act(async () => {
      await api!.handleSubmit(() => undefined)();
    });
    // react-hook-form focuses the first field in error at once and again on the next tick
    // (setTimeout): let that tick run, so what was focused does not depend on the machine's speed.
    await act(() => new Promise((resolve) => setTimeout(resolve, 0)));
    expect(screen.getByText('Type a maker.')).toBeTruthy();
    expect(new Set(focused)).toEqual(new Set(['maker']));
    focused.length = 0;
    act(() => showServerErrors(new ApiError(400, 'bad_request', 'name: Taken.', { name: 'Taken.', maker: 'Unknown maker.' }), api!.setError, ['name', 'maker']));
    expect(focused).toEqual(['name']);
    focus.mockRestore();
  });

  it('focuses a choice or a quantity in error too', async () => {
    const choiceSchema = z.object({ size: z.string().min(1, 'Type the size.'), maker: z.string({ error: 'Choose a maker.' }) });
    type ChoiceValues = z.infer<typeof choiceSchema>;
    let form: ReturnType<typeof useForm<ChoiceValues>> | null = null;
    function ChoiceForm() {
      form = useForm<ChoiceValues>({ resolver: zodResolver(choiceSchema), defaultValues: { size: '' } });
      return (
        <>
          <FormSelect control={form.control} name="maker" label="Maker" testID="maker" placeholder="Choose…" options={[{ value: 'a', label: 'Maker A' }, { value: 'b', label: 'Maker B' }]} />
          <FormQuantity control={form.control} name="size" label="Size" testID="size" units={['in', 'mm']} defaultUnit="in" />
        </>
      );
    }
    const focused: string[] = [];
    const focus = jest.spyOn(TextInput.prototype, 'focus').mockImplementation(function (this: TextInput) {
      focused.push((this.props as { testID?: string }).testID ?? '');
    });
    render(<ChoiceForm />);
    expect(screen.queryByText('Maker B')).toBeNull();
    await act(async () => {
      await form!.handleSubmit(() => undefined)();
    });
    await act(() => new Promise((resolve) => setTimeout(resolve, 0)));
    // The choice comes first: it takes the focus (on the web its <select>), the quantity below does not.
    expect(screen.getByText('Choose a maker.')).toBeTruthy();
    expect(focused).toEqual([]);
    // Its list is not opened for the person, so their press opens it.
    expect(screen.queryByText('Maker B')).toBeNull();
    await act(async () => {
      form!.setValue('maker', 'b');
      await form!.handleSubmit(() => undefined)();
    });
    await act(() => new Promise((resolve) => setTimeout(resolve, 0)));
    expect(screen.getByText('Type the size.')).toBeTruthy();
    expect(new Set(focused)).toEqual(new Set(['size']));
    focus.mockRestore();
  });
});
