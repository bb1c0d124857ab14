import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { fireEvent, render, screen, waitFor } from '@testing-library/react';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { SignInForm } from '@/features/auth/components/sign-in-form';

function renderForm(onSignedIn = vi.fn()) {
  const client = new QueryClient({ defaultOptions: { queries: { retry: false }, mutations: { retry: false } } });
  render(
    <QueryClientProvider client={client}>
      <SignInForm onSignedIn={onSignedIn} />
    </QueryClientProvider>,
  );
  return onSignedIn;
}

function answer(status: number, body: unknown) {
  const fetchMock = vi.fn(async () => new Response(JSON.stringify(body), { status, headers: { 'content-type': 'application/json' } }));
  vi.stubGlobal('fetch', fetchMock);
  return fetchMock;
}

afterEach(() => vi.unstubAllGlobals());

describe('SignInForm', () => {
  it('when both fields are empty, then the shared schema messages show beside the fields and nothing is sent', async () => {
    const fetchMock = answer(200, {});
    renderForm();
    fireEvent.click(screen.getByRole('button', { name: 'Sign in' }));
    expect(await screen.findByText('Enter your e-mail address')).toBeInTheDocument();
    expect(screen.getByText('Enter your password')).toBeInTheDocument();
    expect(screen.getByLabelText('E-mail address')).toHaveAttribute('aria-invalid', 'true');
    expect(fetchMock).not.toHaveBeenCalled();
  });

  it('when the server answers 401, then its message is shown and the user is not signed in', async () => {
    answer(401, { error: { code: 'BAD_CREDENTIALS', message: 'E-mail address or password is not correct' } });
    const onSignedIn = renderForm();
    fireEvent.change(screen.getByLabelText('E-mail address'), { target: { value: 'director@demo.test' } });
    fireEvent.change(screen.getByLabelText('Password'), { target: { value: 'wrong-password' } });
    fireEvent.click(screen.getByRole('button', { name: 'Sign in' }));
    expect(await screen.findByRole('alert')).toHaveTextContent('E-mail address or password is not correct');
    expect(onSignedIn).not.toHaveBeenCalled();
  });

  it('when the server returns a field error, then it is placed beside that field', async () => {
    answer(400, { error: { code: 'VALIDATION_FAILED', message: 'Some fields are not valid', fields: { email: 'Unknown address format' } } });
    renderForm();
    fireEvent.change(screen.getByLabelText('E-mail address'), { target: { value: 'x' } });
    fireEvent.change(screen.getByLabelText('Password'), { target: { value: 'whatever' } });
    fireEvent.click(screen.getByRole('button', { name: 'Sign in' }));
    expect(await screen.findByText('Unknown address format')).toBeInTheDocument();
  });

  it('when the credentials are accepted, then the signed-in user is handed on', async () => {
    const user = { id: 2, email: 'director@demo.test', name: 'Dr Ilse Marchetti', role: 'director', mustChangePassword: false };
    const fetchMock = answer(200, { user });
    const onSignedIn = renderForm();
    fireEvent.change(screen.getByLabelText('E-mail address'), { target: { value: 'director@demo.test' } });
    fireEvent.change(screen.getByLabelText('Password'), { target: { value: 'cristae-demo' } });
    fireEvent.click(screen.getByRole('button', { name: 'Sign in' }));
    await waitFor(() => expect(onSignedIn).toHaveBeenCalledWith(user));
    const [url, init] = fetchMock.mock.calls[0] as unknown as [string, RequestInit];
    expect(url).toBe('/api/auth/login');
    expect(JSON.parse(String(init.body))).toEqual({ email: 'director@demo.test', password: 'cristae-demo' });
  });
});
