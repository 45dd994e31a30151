// @vitest-environment happy-dom
import { cleanup, fireEvent, screen, waitFor } from '@testing-library/react';
import { z } from 'zod';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { renderSignedIn } from './render.tsx';
import { ChoiceField, OptionList, TextAreaField, TextField } from '@/components/form/bound-fields';
import { FormFrame } from '@/components/form/form-frame';
import { ProblemAlert } from '@/components/form/problem-alert';
import { useApiForm } from '@/components/form/use-api-form';
import { ApiProblem } from '@/lib/api-client';

afterEach(cleanup);

const steps = ['clean', 'sanitize', 'rinse'] as const;
const stepLabels = { clean: 'Clean', sanitize: 'Sanitize', rinse: 'Rinse' } as const;

const schema = z.object({
  email: z.email('Enter an e-mail address'),
  password: z.string().min(4, 'At least 4 characters'),
  step: z.enum(steps),
  note: z.string().max(10, 'Keep the note short'),
  reason: z.string().min(1, 'Say why'),
});
type Values = z.infer<typeof schema>;

const Form = ({ onValid }: { onValid: (values: Values) => void }) => {
  const { form, message, submit } = useApiForm<Values>(schema, {
    defaultValues: { email: '', password: '', step: 'sanitize', note: '', reason: '' },
    fields: ['email', 'password', 'step', 'note', 'reason'],
  });
  return (
    <FormFrame onSubmit={submit(onValid)} message={message} submitLabel="Save">
      <TextField form={form} name="email" kind="email" label="E-mail" />
      <TextField form={form} name="password" kind="password" label="Password" />
      <ChoiceField form={form} name="step" label="Step">
        <OptionList values={steps} labels={stepLabels} disabled={(s) => s === 'rinse'} />
      </ChoiceField>
      <TextAreaField form={form} name="note" label="Note" />
      <TextField form={form} name="reason" label="Reason" options={{ setValueAs: (v: string) => v.toUpperCase() }} />
    </FormFrame>
  );
};

describe('TextField, ChoiceField and TextAreaField', () => {
  it('show each field’s error beside it and mark the box invalid', async () => {
    const onValid = vi.fn();
    renderSignedIn(<Form onValid={onValid} />);
    fireEvent.change(screen.getByLabelText('Note'), { target: { value: 'far too long a note' } });
    fireEvent.click(screen.getByRole('button', { name: 'Save' }));
    expect(await screen.findByText('Enter an e-mail address')).toBeTruthy();
    expect(screen.getByText('At least 4 characters')).toBeTruthy();
    expect(screen.getByText('Keep the note short')).toBeTruthy();
    expect(screen.getByText('Say why')).toBeTruthy();
    for (const label of ['E-mail', 'Note', 'Reason']) expect(screen.getByLabelText(label).getAttribute('aria-invalid')).toBe('true');
    expect(onValid).not.toHaveBeenCalled();
  });

  it('hand the form what was typed and chosen, through the register options given', async () => {
    const onValid = vi.fn();
    renderSignedIn(<Form onValid={onValid} />);
    const email = screen.getByLabelText<HTMLInputElement>('E-mail');
    expect(email.type).toBe('email');
    expect(screen.getByLabelText<HTMLInputElement>('Password').type).toBe('password');
    fireEvent.change(email, { target: { value: 'brewer@example.test' } });
    fireEvent.change(screen.getByLabelText('Password'), { target: { value: 'long enough' } });
    fireEvent.change(screen.getByLabelText('Step'), { target: { value: 'clean' } });
    fireEvent.change(screen.getByLabelText('Note'), { target: { value: 'Two\nlines' } });
    fireEvent.change(screen.getByLabelText('Reason'), { target: { value: 'soaked' } });
    fireEvent.click(screen.getByRole('button', { name: 'Save' }));
    await waitFor(() =>
      expect(onValid).toHaveBeenCalledWith({ email: 'brewer@example.test', password: 'long enough', step: 'clean', note: 'Two\nlines', reason: 'SOAKED' }),
    );
  });
});

describe('OptionList', () => {
  it('lists a closed set in its order with its words, and disables what is asked', () => {
    renderSignedIn(<Form onValid={() => undefined} />);
    const options = [...screen.getByLabelText<HTMLSelectElement>('Step').options];
    expect(options.map((o) => [o.value, o.textContent, o.disabled])).toEqual([
      ['clean', 'Clean', false],
      ['sanitize', 'Sanitize', false],
      ['rinse', 'Rinse', true],
    ]);
  });

  it('takes a function for the words', () => {
    renderSignedIn(
      <select aria-label="Pay back">
        <OptionList values={steps} labels={(s) => `Pay back by ${s}`} />
      </select>,
    );
    expect(screen.getByRole('option', { name: 'Pay back by rinse' })).toBeTruthy();
  });
});

describe('FormFrame actions="inline"', () => {
  it('puts the submit button after the fields and the message on a line of its own', () => {
    renderSignedIn(
      <FormFrame
        onSubmit={() => undefined}
        message={{ tone: 'success', text: 'Scheduled.' }}
        submitLabel="Schedule"
        actions="inline"
        className="flex flex-wrap"
      >
        <input aria-label="Rate" />
      </FormFrame>,
    );
    const form = screen.getByRole('button', { name: 'Schedule' }).parentElement!;
    expect(form.tagName).toBe('FORM');
    expect(form.lastElementChild?.textContent).toBe('Schedule');
    expect(screen.getByRole('status').className).toContain('w-full');
  });
});

describe('ProblemAlert', () => {
  it('says nothing without an error, and a failed request’s problem in words', () => {
    const { container } = renderSignedIn(<ProblemAlert error={null} />);
    expect(container.textContent).toBe('');
    cleanup();
    renderSignedIn(<ProblemAlert error={new ApiProblem({ status: 409, title: 'Conflict', detail: 'Already withdrawn.' })} title="Not withdrawn" />);
    const alert = screen.getByRole('alert');
    expect(alert.textContent).toContain('Not withdrawn');
    expect(alert.textContent).toContain('Already withdrawn.');
  });
});

describe('FormFrame panel', () => {
  it('stands in a bordered box with its button under the fields', () => {
    renderSignedIn(
      <FormFrame onSubmit={() => undefined} submitLabel="Save" panel className="max-w-3xl" aria-label="Profile">
        <input aria-label="Name" />
      </FormFrame>,
    );
    const form = screen.getByRole('form', { name: 'Profile' });
    expect(form.className).toContain('border');
    expect(form.className).toContain('max-w-3xl');
    expect(screen.getByRole('button', { name: 'Save' }).parentElement?.parentElement).toBe(form);
  });
});

describe('useApiForm frame', () => {
  const Sender = ({ send }: { send: (values: { reason: string }) => Promise<unknown> }) => {
    const { form, frame } = useApiForm<{ reason: string }>(z.object({ reason: z.string().min(1, 'Say why') }), {
      defaultValues: { reason: '' },
      fields: ['reason'],
    });
    return (
      <FormFrame {...frame(send, false)} submitLabel="Send">
        <TextField form={form} name="reason" label="Reason" />
      </FormFrame>
    );
  };

  it('sends a valid form once, and puts a failed request’s problem on the fields it names and above them', async () => {
    const send = vi.fn(() =>
      Promise.reject(
        new ApiProblem({
          status: 422,
          title: 'Validation failed',
          detail: 'Not saved.',
          errors: [
            { path: 'reason', message: 'Too vague.' },
            { path: 'other', message: 'Closed month.' },
          ],
        }),
      ),
    );
    renderSignedIn(<Sender send={send} />);
    fireEvent.click(screen.getByRole('button', { name: 'Send' }));
    expect(await screen.findByText('Say why')).toBeTruthy();
    expect(send).not.toHaveBeenCalled();
    fireEvent.change(screen.getByLabelText('Reason'), { target: { value: 'soaked' } });
    fireEvent.click(screen.getByRole('button', { name: 'Send' }));
    expect(await screen.findByText('Too vague.')).toBeTruthy();
    expect(screen.getByRole('alert').textContent).toContain('Closed month.');
    expect(send).toHaveBeenCalledTimes(1);
    expect(send).toHaveBeenCalledWith({ reason: 'soaked' });
  });
});
