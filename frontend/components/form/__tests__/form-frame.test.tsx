// @vitest-environment happy-dom
import { cleanup, fireEvent, screen, waitFor } from '@testing-library/react';
import { useForm } from 'react-hook-form';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { renderSignedIn } from './render.tsx';
import { FormFrame } from '@/components/form/form-frame';
import { NumberField } from '@/components/form/number-field';
import { useActionError } from '@/components/form/use-action-error';
import { FormDialog } from '@/components/ui/form-dialog';
import { ApiProblem } from '@/lib/api-client';

afterEach(cleanup);

describe('FormFrame', () => {
  it('shows the message above the fields, a Cancel and the submit button, and submits once', () => {
    const submitted = vi.fn((event: { preventDefault: () => void }) => event.preventDefault());
    const cancelled = vi.fn();
    renderSignedIn(
      <FormFrame onSubmit={submitted} message={{ tone: 'error', text: 'Closed month.' }} submitLabel="Add" onCancel={cancelled}>
        <input aria-label="Box" />
      </FormFrame>,
    );
    expect(screen.getByRole('alert').textContent).toBe('Closed month.');
    fireEvent.click(screen.getByRole('button', { name: 'Cancel' }));
    expect(cancelled).toHaveBeenCalledTimes(1);
    fireEvent.click(screen.getByRole('button', { name: 'Add' }));
    expect(submitted).toHaveBeenCalledTimes(1);
  });

  it('has no buttons without a submit label, and says the read-only note instead', () => {
    renderSignedIn(
      <FormFrame onSubmit={() => undefined} readOnlyNote={<p>Only the admin changes these rules.</p>} aria-label="Rules">
        <input aria-label="Box" />
      </FormFrame>,
    );
    expect(screen.queryByRole('button')).toBeNull();
    expect(screen.getByText('Only the admin changes these rules.')).toBeTruthy();
    expect(screen.getByRole('form', { name: 'Rules' })).toBeTruthy();
  });

  it('keeps Cancel waiting and the dialog open while the request is pending', () => {
    const closed = vi.fn();
    renderSignedIn(
      <FormDialog open onClose={closed} title="Add a charge">
        <FormFrame onSubmit={() => undefined} submitLabel="Add" onCancel={closed} pending>
          <input aria-label="Box" />
        </FormFrame>
      </FormDialog>,
    );
    expect(screen.getByRole<HTMLButtonElement>('button', { name: 'Cancel' }).disabled).toBe(true);
    fireEvent.click(screen.getByRole('button', { name: 'Close' }));
    expect(closed).not.toHaveBeenCalled();
  });
});

describe('NumberField', () => {
  it('reads a decimal comma, and an empty box as the field says: refused, left out or not given', async () => {
    const submitted = vi.fn();
    const Form = () => {
      const form = useForm<{ days: number; strength?: number; rise: number | null }>({ defaultValues: { days: 7, strength: 1, rise: 2 } });
      return (
        <form onSubmit={form.handleSubmit((values) => submitted(values))}>
          <NumberField form={form} name="days" label="Days" />
          <NumberField form={form} name="strength" label="Strength" empty="omit" />
          <NumberField form={form} name="rise" label="Rise" empty="null" />
          <button type="submit">Save</button>
        </form>
      );
    };
    renderSignedIn(<Form />);
    fireEvent.change(screen.getByLabelText('Days'), { target: { value: '2,5' } });
    fireEvent.change(screen.getByLabelText('Strength'), { target: { value: '' } });
    fireEvent.change(screen.getByLabelText('Rise'), { target: { value: '' } });
    fireEvent.click(screen.getByText('Save'));
    await waitFor(() => expect(submitted).toHaveBeenCalledWith({ days: 2.5, strength: undefined, rise: null }));
  });

  it('shows the field’s error beside it', async () => {
    const Form = () => {
      const form = useForm<{ days: number }>({ defaultValues: { days: 7 } });
      return (
        <form onSubmit={form.handleSubmit(() => form.setError('days', { message: 'At least one day.' }))}>
          <NumberField form={form} name="days" label="Days" />
          <button type="submit">Save</button>
        </form>
      );
    };
    renderSignedIn(<Form />);
    fireEvent.click(screen.getByText('Save'));
    expect(await screen.findByText('At least one day.')).toBeTruthy();
    expect(screen.getByLabelText('Days').getAttribute('aria-invalid')).toBe('true');
  });
});

describe('useActionError', () => {
  const Form = ({ action }: { action: () => Promise<string | void> }) => {
    const { error, onSubmit } = useActionError();
    return (
      <FormFrame onSubmit={onSubmit(action)} error={error} submitLabel="Move">
        <input aria-label="Box" />
      </FormFrame>
    );
  };

  it('shows a refusal the action returns, and the problem of a failed request in words', async () => {
    renderSignedIn(<Form action={() => Promise.resolve('Give what is left, in L.')} />);
    fireEvent.click(screen.getByRole('button', { name: 'Move' }));
    expect((await screen.findByRole('alert')).textContent).toBe('Give what is left, in L.');
    cleanup();
    renderSignedIn(<Form action={() => Promise.reject(new ApiProblem({ status: 409, title: 'Conflict', detail: 'The tap is taken.' }))} />);
    fireEvent.click(screen.getByRole('button', { name: 'Move' }));
    expect((await screen.findByRole('alert')).textContent).toContain('The tap is taken.');
  });

  it('shows nothing once the action is done', async () => {
    const action = vi.fn(() => Promise.resolve());
    renderSignedIn(<Form action={action} />);
    fireEvent.click(screen.getByRole('button', { name: 'Move' }));
    await waitFor(() => expect(action).toHaveBeenCalledTimes(1));
    expect(screen.queryByRole('alert')).toBeNull();
  });
});
