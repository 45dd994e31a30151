// @vitest-environment happy-dom
import { act, cleanup, fireEvent, screen, waitFor } from '@testing-library/react';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { z } from 'zod';
import { answer, renderSignedIn } from './render.tsx';
import { useApiForm } from '@/components/form/use-api-form';
import { FormMessageAlert, InputField } from '@/components/ui/field';
import { useSettingForm } from '@/features/settings/hooks/use-setting-form';
import { ApiProblem, resetCsrfToken } from '@/lib/api-client';

const schema = z.object({ name: z.string().min(1, 'Give a name.'), days: z.number({ error: 'Give a number of days.' }).int().min(1, 'At least one day.') });
type Values = z.infer<typeof schema>;
const days = { setValueAs: (v: string) => (v === '' ? Number.NaN : Number(v)) };

afterEach(cleanup);

describe('useApiForm: a 422 problem lands on the form', () => {
  let fail: unknown = null;
  const Form = () => {
    const { form, message, showProblem, submit } = useApiForm<Values>(schema, { defaultValues: { name: 'Cold room', days: 7 }, fields: ['name', 'days'] });
    const errors = form.formState.errors;
    return (
      <form onSubmit={submit(() => showProblem(fail))} noValidate>
        <FormMessageAlert message={message} />
        <InputField label="Name" error={errors.name?.message} {...form.register('name')} />
        <InputField label="Days" error={errors.days?.message} {...form.register('days', days)} />
        <button type="submit">Send</button>
      </form>
    );
  };

  it('puts each error beside the field its path names (JSON pointer, body. prefix or plain)', async () => {
    fail = new ApiProblem({
      status: 422,
      title: 'Validation failed',
      errors: [
        { path: '/name', message: 'That name is taken.' },
        { path: 'body.days', message: 'Too many days.' },
        { path: 'days', message: 'Second message for days.' },
      ],
    });
    renderSignedIn(<Form />);
    fireEvent.click(screen.getByText('Send'));
    await screen.findByText('That name is taken.');
    expect(screen.getByText('Too many days.')).toBeTruthy();
    expect(screen.queryByText('Second message for days.')).toBeNull(); // one message a field
    expect(screen.getByLabelText('Name').getAttribute('aria-invalid')).toBe('true');
  });

  it('says above the form what names no field of it, or the problem itself when it names none', async () => {
    fail = new ApiProblem({ status: 422, title: 'Validation failed', errors: [{ path: 'period', message: 'Closed month.' }] });
    renderSignedIn(<Form />);
    fireEvent.click(screen.getByText('Send'));
    expect((await screen.findByText('period: Closed month.')).closest('[role=alert]')).toBeTruthy();
    cleanup();
    fail = new ApiProblem({ status: 409, title: 'Conflict', detail: 'Someone else changed it.' });
    renderSignedIn(<Form />);
    fireEvent.click(screen.getByText('Send'));
    expect(await screen.findByText(/Someone else changed it\./)).toBeTruthy();
  });

  it('shows the schema’s own messages and no form message when the values are refused before sending', async () => {
    fail = new ApiProblem({ status: 500, title: 'Should not be reached' });
    renderSignedIn(<Form />);
    fireEvent.change(screen.getByLabelText('Name'), { target: { value: '' } });
    fireEvent.click(screen.getByText('Send'));
    expect(await screen.findByText('Give a name.')).toBeTruthy();
    expect(screen.queryByText(/Should not be reached/)).toBeNull();
  });
});

describe('useSettingForm', () => {
  let fetchMock: ReturnType<typeof vi.fn>;
  beforeEach(() => {
    resetCsrfToken();
    fetchMock = vi.fn();
    vi.stubGlobal('fetch', fetchMock);
  });
  afterEach(() => vi.unstubAllGlobals());

  const SettingsForm = () => {
    const { form, message, onSubmit } = useSettingForm<Values>(
      'shelf_life',
      schema,
      { name: 'Cold room', days: 7 },
      { savedText: 'Saved.', fields: ['name', 'days'] },
    );
    const errors = form.formState.errors;
    return (
      <form onSubmit={onSubmit} noValidate>
        <FormMessageAlert message={message} />
        <InputField label="Name" error={errors.name?.message} {...form.register('name')} />
        <InputField label="Days" error={errors.days?.message} {...form.register('days', days)} />
        <button type="submit">Save</button>
      </form>
    );
  };

  const route = (put: () => Response) =>
    fetchMock.mockImplementation((url: string, init?: RequestInit) =>
      Promise.resolve(
        url === '/api/auth/csrf' ? answer(200, { token: 't' }) : init?.method === 'PUT' ? put() : answer(404, { title: 'Not found', status: 404 }),
      ),
    );

  it('says "saved" after a save and never beside a later validation error', async () => {
    route(() => answer(200, { key: 'shelf_life', value: { name: 'Cold room', days: 9 } }));
    renderSignedIn(<SettingsForm />);
    fireEvent.change(screen.getByLabelText('Days'), { target: { value: '9' } });
    fireEvent.click(screen.getByText('Save'));
    expect(await screen.findByText('Saved.')).toBeTruthy();
    expect(screen.getByLabelText<HTMLInputElement>('Days').value).toBe('9');
    fireEvent.change(screen.getByLabelText('Days'), { target: { value: '0' } });
    await waitFor(() => expect(screen.queryByText('Saved.')).toBeNull()); // gone as soon as a field changes
    fireEvent.click(screen.getByText('Save'));
    expect(await screen.findByText('At least one day.')).toBeTruthy();
    expect(screen.queryByText('Saved.')).toBeNull();
    expect(fetchMock.mock.calls.filter(([, init]) => (init as RequestInit | undefined)?.method === 'PUT')).toHaveLength(1);
  });

  it('puts the server’s 422 beside the field and says nothing was saved', async () => {
    route(() =>
      answer(422, { type: 'about:blank', title: 'Validation failed', status: 422, errors: [{ path: 'days', message: 'More than the co-op allows.' }] }),
    );
    renderSignedIn(<SettingsForm />);
    await act(async () => {
      fireEvent.click(screen.getByText('Save'));
      await Promise.resolve();
    });
    expect(await screen.findByText('More than the co-op allows.')).toBeTruthy();
    expect(screen.queryByText('Saved.')).toBeNull();
  });
});
