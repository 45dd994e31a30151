// @vitest-environment happy-dom
import { cleanup, fireEvent, screen } from '@testing-library/react';
import { MemoryRouter } from 'react-router-dom';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { answer, renderSignedIn } from '../../../../components/form/__tests__/render.tsx';
import { ResetPasswordForm } from '@/features/auth/components/reset-password-form';
import { resetCsrfToken } from '@/lib/api-client';

afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
});

describe('ResetPasswordForm', () => {
  let fetchMock: ReturnType<typeof vi.fn>;
  beforeEach(() => {
    resetCsrfToken();
    fetchMock = vi.fn();
    vi.stubGlobal('fetch', fetchMock);
  });

  const route = (confirm: () => Response) =>
    fetchMock.mockImplementation((url: string) => Promise.resolve(url === '/api/auth/csrf' ? answer(200, { token: 't' }) : confirm()));

  const fill = (password: string, repeat: string) => {
    fireEvent.change(screen.getByLabelText('New password'), { target: { value: password } });
    fireEvent.change(screen.getByLabelText('Repeat the password'), { target: { value: repeat } });
    fireEvent.click(screen.getByRole('button', { name: 'Save the new password' }));
  };

  it('says the password changed once the link took it', async () => {
    route(() => new Response(null, { status: 204 }));
    renderSignedIn(
      <MemoryRouter>
        <ResetPasswordForm token="abc" />
      </MemoryRouter>,
    );
    fill('a-brand-new-password', 'a-brand-new-password');
    expect(await screen.findByText('Password changed')).toBeTruthy();
  });

  it('refuses two different passwords before sending, and says a dead link is dead', async () => {
    route(() => answer(410, { title: 'Gone', status: 410 }));
    renderSignedIn(
      <MemoryRouter>
        <ResetPasswordForm token="abc" />
      </MemoryRouter>,
    );
    fill('a-brand-new-password', 'another-password');
    expect(await screen.findByLabelText('Repeat the password')).toBeTruthy();
    expect(fetchMock.mock.calls.some(([url]) => String(url).includes('confirm'))).toBe(false);
    fill('a-brand-new-password', 'a-brand-new-password');
    expect(await screen.findByText('This link no longer works')).toBeTruthy();
  });
});
