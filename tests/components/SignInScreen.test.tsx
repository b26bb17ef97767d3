import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { fireEvent, render, screen, waitFor } from '@testing-library/react-native';
import { getCsrfToken, setCsrfToken } from '../../components/api/client';
import { SignInScreen } from '../../components/auth/SignInScreen';

function renderScreen() {
  // gcTime Infinity: no garbage-collection timers left running after the test.
  const client = new QueryClient({
    defaultOptions: { queries: { retry: false, gcTime: Infinity }, mutations: { retry: false, gcTime: Infinity } },
  });
  return render(
    <QueryClientProvider client={client}>
      <SignInScreen />
    </QueryClientProvider>,
  );
}

/** jsdom has no fetch: each test installs its own fake answering like the API. */
function fakeFetch(status: number, body: unknown) {
  const fn = jest.fn(async () => ({ ok: status >= 200 && status < 300, status, json: async () => body, headers: { get: () => null } }));
  (globalThis as { fetch: unknown }).fetch = fn;
  return fn as unknown as jest.Mock<Promise<unknown>, [string, RequestInit | undefined]>;
}

jest.setTimeout(30_000);

describe('SignInScreen', () => {
  it('shows the shared schema messages for an empty form and sends nothing', async () => {
    const fetchSpy = fakeFetch(500, {});
    renderScreen();
    fireEvent.press(screen.getByTestId('sign-in-submit'));
    expect(await screen.findByText('Enter your e-mail address.')).toBeTruthy();
    expect(screen.getByText('Enter your password.')).toBeTruthy();
    expect(fetchSpy).not.toHaveBeenCalled();
  });

  it('shows the server message at the form when the password is wrong', async () => {
    fakeFetch(401, { error: { id: 'unauthorized', message: 'That e-mail and password do not match an account.' } });
    renderScreen();
    fireEvent.changeText(screen.getByTestId('sign-in-email'), 'someone@site.example');
    fireEvent.changeText(screen.getByTestId('sign-in-password'), 'wrong password');
    fireEvent.press(screen.getByTestId('sign-in-submit'));
    await waitFor(() => expect(screen.getByTestId('sign-in-error')).toBeTruthy());
    expect(screen.getByText('That e-mail and password do not match an account.')).toBeTruthy();
  });

  it('sends the CSRF token header and JSON body through the one write path', async () => {
    // Signed out, GET /api/session hands out the pre-sign-in token (the session query keeps it);
    // the sign-in answer carries the signed-in one, which the next write must send.
    setCsrfToken('pre-sign-in-token');
    const fetchSpy = fakeFetch(200, { user: null, jobs: [], csrfToken: 'signed-in-token' });
    renderScreen();
    fireEvent.changeText(screen.getByTestId('sign-in-email'), 'someone@site.example');
    fireEvent.changeText(screen.getByTestId('sign-in-password'), 'a long password');
    fireEvent.press(screen.getByTestId('sign-in-submit'));
    await waitFor(() => expect(fetchSpy).toHaveBeenCalled());
    const [url, init] = fetchSpy.mock.calls[0]!;
    expect(url).toBe('/api/session');
    expect(init?.method).toBe('POST');
    expect((init?.headers as Record<string, string>)['X-CSRF-Token']).toBe('pre-sign-in-token');
    expect((init?.headers as Record<string, string>)['Idempotency-Key']).toMatch(/^[0-9a-f-]{36}$/);
    expect(JSON.parse(String(init?.body))).toEqual({ email: 'someone@site.example', password: 'a long password' });
    await waitFor(() => expect(getCsrfToken()).toBe('signed-in-token'));
  });
});
