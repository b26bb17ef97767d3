/**
 * Several people pasted to be invited at once (components/invitations/PastePeople.tsx): the
 * preview shows each line as it will be sent with its own problems, nothing is sent while a
 * line needs a change, and a refusal from the server that names a line sits on that line until
 * the line is changed.
 */
import { fireEvent, render, screen, waitFor, within } from '@testing-library/react-native';
import type { InvitationBulkInput } from '../../shared/schemas/auth';
import { ApiError } from '../../components/api/client';
import { PastePeople } from '../../components/invitations/PastePeople';

const PINECREST = '22222222-2222-4222-8222-222222222222';
const COMPANIES = [
  { id: '11111111-1111-4111-8111-111111111111', name: 'Halvard Street Builders' },
  { id: PINECREST, name: 'Pinecrest Mechanical' },
];

type People = InvitationBulkInput['people'];

function paste(send: (people: People) => Promise<unknown>) {
  render(<PastePeople companies={COMPANIES} send={send} />);
}

const type = (text: string) => fireEvent.changeText(screen.getByTestId('invite-paste-input'), text);
const line = (n: number) => within(screen.getByTestId(`invite-paste-line-${n}`));

describe('PastePeople', () => {
  it('previews each line as it will be sent, the company by its listed name, and sends them in one list', async () => {
    const sent: People[] = [];
    paste(async (people) => sent.push(people));
    type('E-mail\tRole\tCompany\nana@pinecrest.example\tsub\tpinecrest mechanical\n\nlio@halvard.example, GC manager\n');
    expect(screen.getByText('2 people to invite (the heading row is left out)')).toBeTruthy();
    expect(line(1).getByText('ana@pinecrest.example')).toBeTruthy();
    expect(line(1).getByText('Subcontractor · Pinecrest Mechanical')).toBeTruthy();
    expect(line(2).getByText('GC manager · your own company')).toBeTruthy();
    expect(line(2).getByText('Ready')).toBeTruthy();
    fireEvent.press(screen.getByTestId('invite-paste-submit'));
    await waitFor(() => expect(screen.getByTestId('invite-paste-sent')).toBeTruthy());
    expect(screen.getByText('Invitations sent to 2 people.')).toBeTruthy();
    expect(sent).toEqual([
      [
        { email: 'ana@pinecrest.example', role: 'subcontractor', companyId: PINECREST },
        { email: 'lio@halvard.example', role: 'gc_manager' },
      ],
    ]);
    expect(screen.queryByTestId('invite-paste-preview')).toBeNull(); // the box is empty again
  });

  it('shows a line problem on its line before sending, sends nothing, and sends once the line is fixed', async () => {
    const sent: People[] = [];
    paste(async (people) => sent.push(people));
    type('ana@pinecrest.example, sub, Pinecrest Mech\nlio@halvard.example, inspector');
    expect(line(1).getByTestId('invite-paste-line-1-problem').props.children).toBe(
      'Company: No company named "Pinecrest Mech" on this job. Check the spelling, or add it on the Companies page first.',
    );
    expect(line(1).getByText('Needs a change')).toBeTruthy();
    expect(line(2).queryByTestId('invite-paste-line-2-problem')).toBeNull();
    fireEvent.press(screen.getByTestId('invite-paste-submit'));
    // the box says which line, the banner names the box
    await waitFor(() => expect(screen.getByTestId('invite-paste-error')).toBeTruthy());
    expect(screen.getAllByText(/^Line 1: No company named "Pinecrest Mech"/).length).toBeGreaterThan(0);
    expect(sent).toEqual([]);

    type('ana@pinecrest.example, sub, Pinecrest Mechanical\nlio@halvard.example, inspector');
    expect(line(1).queryByTestId('invite-paste-line-1-problem')).toBeNull();
    fireEvent.press(screen.getByTestId('invite-paste-submit'));
    await waitFor(() => expect(sent).toHaveLength(1));
  });

  it("puts the server's refusal of line 2 on line 2, and drops it when that line changes", async () => {
    const sent: People[] = [];
    let refuse = true;
    paste(async (people) => {
      if (refuse) {
        throw new ApiError(409, 'already_member', 'Line 2 (lio@halvard.example): That person is already a member of this job. Nobody was invited.', {
          'people.1.email': 'That person is already a member of this job.',
        });
      }
      sent.push(people);
    });
    type('ana@pinecrest.example, sub, Pinecrest Mechanical\nlio@halvard.example, inspector\nkai@halvard.example, inspector');
    fireEvent.press(screen.getByTestId('invite-paste-submit'));
    await waitFor(() => expect(line(2).getByTestId('invite-paste-line-2-problem')).toBeTruthy());
    expect(line(2).getByTestId('invite-paste-line-2-problem').props.children).toBe('E-mail: That person is already a member of this job.');
    expect(line(2).getByText('Needs a change')).toBeTruthy();
    expect(line(1).queryByTestId('invite-paste-line-1-problem')).toBeNull();
    expect(screen.getAllByText('Line 2 (lio@halvard.example): That person is already a member of this job. Nobody was invited.').length).toBeGreaterThan(0);

    // another line changed: line 2's refusal stays
    type('ana@pinecrest.example, sub, Pinecrest Mechanical\nlio@halvard.example, inspector\nkai@halvard.example, GC manager');
    expect(line(2).getByTestId('invite-paste-line-2-problem')).toBeTruthy();
    // line 2 changed: its refusal goes, and the list sends
    refuse = false;
    type('ana@pinecrest.example, sub, Pinecrest Mechanical\nnoor@halvard.example, inspector\nkai@halvard.example, GC manager');
    expect(line(2).queryByTestId('invite-paste-line-2-problem')).toBeNull();
    fireEvent.press(screen.getByTestId('invite-paste-submit'));
    await waitFor(() => expect(screen.getByText('Invitations sent to 3 people.')).toBeTruthy());
    expect(sent[0]!.map((p) => p.email)).toEqual(['ana@pinecrest.example', 'noor@halvard.example', 'kai@halvard.example']);
  });

  it('a refusal that names no line is said above the box', async () => {
    paste(async () => {
      throw new ApiError(403, 'forbidden', 'Only GC managers can do that.');
    });
    type('lio@halvard.example, inspector');
    fireEvent.press(screen.getByTestId('invite-paste-submit'));
    await waitFor(() => expect(screen.getByText('Only GC managers can do that.')).toBeTruthy());
    expect(line(1).queryByTestId('invite-paste-line-1-problem')).toBeNull();
  });
});
