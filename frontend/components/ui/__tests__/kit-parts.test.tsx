// @vitest-environment happy-dom
import { cleanup, fireEvent, render, screen } from '@testing-library/react';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { MutationConfirmDialog, type ConfirmedMutation } from '@/components/ui/dialog';
import { Options, Select } from '@/components/ui/input';
import { BigAmount } from '@/components/ui/touch';

afterEach(cleanup);

describe('Options', () => {
  it('lists the values in order under their labels, or as themselves', () => {
    render(
      <Select aria-label="Kind">
        <Options values={['b', 'a', 'c']} labels={{ a: 'Amber', b: 'Bitter' }} />
      </Select>,
    );
    const options = screen.getAllByRole<HTMLOptionElement>('option');
    expect(options.map((o) => [o.value, o.textContent])).toEqual([
      ['b', 'Bitter'],
      ['a', 'Amber'],
      ['c', 'c'],
    ]);
  });
});

describe('BigAmount', () => {
  it('is a decimal number box that refuses negatives', () => {
    render(<BigAmount aria-label="Strength" value="2" onChange={() => undefined} />);
    const box = screen.getByLabelText('Strength');
    expect(box.getAttribute('type')).toBe('number');
    expect(box.getAttribute('inputmode')).toBe('decimal');
    expect(box.getAttribute('min')).toBe('0');
    expect(box.getAttribute('step')).toBe('any');
  });
});

describe('MutationConfirmDialog', () => {
  const mutationOf = (over: Partial<ConfirmedMutation<{ number: string }>>): ConfirmedMutation<{ number: string }> => ({
    isPending: false,
    error: null,
    mutate: (_, { onSuccess }) => onSuccess({ number: 'INV-7' }),
    ...over,
  });

  it('runs the change on confirm, closes, then reports what it gave', () => {
    const order: string[] = [];
    render(
      <MutationConfirmDialog
        open
        title="Issue this invoice?"
        confirmLabel="Issue it"
        mutation={mutationOf({})}
        onClose={() => order.push('closed')}
        onDone={(data) => order.push(`done ${data.number}`)}
      >
        It takes the next number.
      </MutationConfirmDialog>,
    );
    fireEvent.click(screen.getByRole('button', { name: 'Issue it' }));
    expect(order).toEqual(['closed', 'done INV-7']);
  });

  it('shows the error of a change that failed and stays open', () => {
    const onClose = vi.fn();
    render(
      <MutationConfirmDialog
        open
        title="Send?"
        confirmLabel="Send"
        mutation={mutationOf({ error: new Error('The mail server is away.'), mutate: vi.fn() })}
        onClose={onClose}
        onDone={vi.fn()}
      >
        The PDF goes out.
      </MutationConfirmDialog>,
    );
    expect(screen.getByText('The mail server is away.')).toBeTruthy();
    expect(onClose).not.toHaveBeenCalled();
  });
});
