// @vitest-environment happy-dom
import { createColumnHelper } from '@tanstack/react-table';
import { cleanup, fireEvent, render, screen, within } from '@testing-library/react';
import { afterEach, describe, expect, it, vi } from 'vitest';
import {
  Dash,
  dateCell,
  dateTimeCell,
  EmptyRow,
  figureHead,
  hiddenHead,
  ListSearch,
  ListTable,
  nowrapCell,
  QueryFilter,
  TableHead,
  type ListResult,
} from '@/components/list-kit';
import { formatDate, formatDateTime } from '@/utils/format';

interface Row {
  id: string;
  name: string;
  day: string | null;
  at: string;
}

const column = createColumnHelper<Row>();
const columns = [
  column.accessor('name', { header: 'Name', cell: nowrapCell }),
  column.accessor('day', { header: 'Day', cell: dateCell }),
  column.accessor('at', { header: 'At', cell: dateTimeCell }),
];
const rows: Row[] = [
  { id: 'a', name: 'Amber', day: '2026-12-03', at: '2026-12-03T14:00:00Z' },
  { id: 'b', name: 'Bitter', day: null, at: '2026-11-01T09:30:00Z' },
];
const loaded = (items: Row[], total = items.length): ListResult<Row> => ({
  data: { items, total, page: 1, pageSize: 25 },
  isPending: false,
  error: null,
  isFetching: false,
  isPlaceholderData: false,
  refetch: vi.fn(),
});
const query = { page: 1, pageSize: 25 };

afterEach(cleanup);

describe('the list table', () => {
  it('renders rows from column definitions, with the kit’s day and time cells, and no sorting when the list has none', () => {
    render(<ListTable list={loaded(rows)} query={query} onQueryChange={vi.fn()} columns={columns} caption="Beers" noun={['beer', 'beers']} />);
    const table = screen.getByRole('table', { name: 'Beers' });
    expect(within(table).queryAllByRole('button')).toHaveLength(0);
    const [, first, second] = within(table).getAllByRole('row');
    const day = within(first!).getByText(formatDate('2026-12-03'));
    expect(day.tagName).toBe('TIME');
    expect(day.getAttribute('datetime')).toBe('2026-12-03');
    expect(within(first!).getByText(formatDateTime('2026-12-03T14:00:00Z')).getAttribute('datetime')).toBe('2026-12-03T14:00:00Z');
    expect(within(second!).getByText('—').tagName).toBe('TIME');
    expect(within(first!).getByText('Amber').className).toContain('whitespace-nowrap');
    expect(screen.getByText('1–2 of 2 beers')).toBeTruthy();
  });

  it('sorts only by the server’s sort fields and sends the click as sort and order', () => {
    const onQueryChange = vi.fn();
    render(
      <ListTable
        list={loaded(rows)}
        query={{ ...query, sort: 'name', order: 'asc' as const }}
        onQueryChange={onQueryChange}
        columns={columns}
        sortFields={['name', 'at']}
        caption="Beers"
        noun="beers"
      />,
    );
    expect(screen.getByRole('columnheader', { name: /Name/ }).getAttribute('aria-sort')).toBe('ascending');
    fireEvent.click(screen.getByRole('button', { name: /At/ }));
    expect(onQueryChange).toHaveBeenLastCalledWith({ sort: 'at', order: 'asc' });
    onQueryChange.mockClear();
    fireEvent.click(screen.getByRole('button', { name: /Day/ }));
    expect(onQueryChange).not.toHaveBeenCalled();
  });

  it('shows the failure with Retry instead of the empty text', () => {
    const list = { ...loaded([]), data: undefined, error: new Error('offline') };
    render(<ListTable list={list} query={query} onQueryChange={vi.fn()} columns={columns} caption="Beers" empty="No beers yet." noun="beers" />);
    expect(screen.queryByText('No beers yet.')).toBeNull();
    fireEvent.click(screen.getByRole('button', { name: 'Retry' }));
    expect(list.refetch).toHaveBeenCalled();
  });
});

describe('the filters bound to the query', () => {
  it('sets its own key of the query, and only to a listed value or back to any', () => {
    const onQueryChange = vi.fn();
    render(
      <QueryFilter
        name="colour"
        label="Colour"
        query={{ colour: 'red' }}
        onQueryChange={onQueryChange}
        options={['red', 'green']}
        labels={{ red: 'Red', green: 'Green' }}
        anyLabel="Any colour"
      />,
    );
    const select = screen.getByLabelText<HTMLSelectElement>('Colour');
    expect(select.value).toBe('red');
    fireEvent.change(select, { target: { value: 'green' } });
    expect(onQueryChange).toHaveBeenLastCalledWith({ colour: 'green' });
    fireEvent.change(select, { target: { value: '' } });
    expect(onQueryChange).toHaveBeenLastCalledWith({ colour: undefined });
  });

  it('searches the list’s q under its label, at once on Enter', () => {
    const onQueryChange = vi.fn();
    render(<ListSearch label="Find" query={{ q: 'ale' }} onQueryChange={onQueryChange} placeholder="Name" />);
    const box = screen.getByLabelText<HTMLInputElement>('Find');
    expect(box.value).toBe('ale');
    fireEvent.change(box, { target: { value: ' stout ' } });
    fireEvent.keyDown(box, { key: 'Enter' });
    expect(onQueryChange).toHaveBeenLastCalledWith({ q: 'stout' }, { replace: false });
  });
});

describe('the parts of a hand-written table', () => {
  it('heads its columns from data: text, figures aligned right, a column of buttons named for screen readers only', () => {
    render(
      <table>
        <TableHead cells={['Member', figureHead('Total', 'hidden sm:table-cell'), hiddenHead('Action')]} cellClassName="px-3" />
        <tbody>
          <EmptyRow colSpan={3}>
            <Dash /> Nothing yet.
          </EmptyRow>
        </tbody>
      </table>,
    );
    const heads = screen.getAllByRole('columnheader');
    expect(heads.map((h) => h.textContent)).toEqual(['Member', 'Total', 'Action']);
    expect(heads.every((h) => h.getAttribute('scope') === 'col' && h.className.includes('px-3'))).toBe(true);
    expect(heads[1]!.className).toContain('text-right');
    expect(heads[1]!.className).toContain('sm:table-cell');
    expect(heads[2]!.querySelector('.sr-only')?.textContent).toBe('Action');
    const cell = screen.getByRole('cell');
    expect(cell.getAttribute('colspan')).toBe('3');
    expect(cell.textContent).toBe('— Nothing yet.');
  });
});
