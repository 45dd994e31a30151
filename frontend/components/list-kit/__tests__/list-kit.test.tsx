// @vitest-environment happy-dom
import { QueryClient, QueryClientProvider, useQuery } from '@tanstack/react-query';
import { createColumnHelper } from '@tanstack/react-table';
import { act, cleanup, fireEvent, render, screen, waitFor } from '@testing-library/react';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { z } from 'zod';
import type { ReactNode } from 'react';
import { BrowserRouter } from 'react-router-dom';
import { sortableListQuerySchema, searchTextSchema } from '../../../../shared/schemas/pagination.ts';
import { defineListQuery, FilterSelect, ListTable, pageQueryOptions, SearchInput, useListQuery } from '@/components/list-kit';

interface Row {
  id: string;
  name: string;
}

const sortFields = ['name', 'createdAt'] as const;
const colours = ['red', 'green'] as const;
const listQuery = defineListQuery(sortableListQuerySchema(sortFields, 'createdAt').extend({ q: searchTextSchema, colour: z.enum(colours).optional() }), {
  order: 'desc',
});
const column = createColumnHelper<Row>();
const columns = [column.accessor('name', { header: 'Name' }), column.accessor('id', { header: 'Id', enableSorting: false })];

/** A list screen built from the kit alone, as every list screen is. */
const Screen = () => {
  const { query, setQuery, hasFilters, clearFilters } = useListQuery(listQuery);
  const list = useQuery(pageQueryOptions<Row>(['things', 'list', query], '/api/things', query));
  return (
    <div>
      <SearchInput aria-label="Search" value={query.q} onSearch={(q, options) => setQuery({ q }, options)} />
      <FilterSelect label="Colour" value={query.colour} onChange={(colour) => setQuery({ colour })} options={colours} anyLabel="Any colour" />
      {hasFilters ? <button onClick={clearFilters}>Clear filters</button> : null}
      <output data-testid="query">{JSON.stringify(query)}</output>
      <ListTable list={list} query={query} onQueryChange={setQuery} columns={columns} sortFields={sortFields} caption="Things" noun={['thing', 'things']} />
    </div>
  );
};

const fetchMock = vi.fn<typeof fetch>();
const urlOf = (input: Parameters<typeof fetch>[0]) =>
  new URL(typeof input === 'string' ? input : input instanceof URL ? input.href : input.url, window.location.origin);

function renderAt(url: string, ui: ReactNode = <Screen />) {
  window.history.replaceState(null, '', url);
  const client = new QueryClient({ defaultOptions: { queries: { retry: false } } });
  return render(
    <QueryClientProvider client={client}>
      <BrowserRouter>{ui}</BrowserRouter>
    </QueryClientProvider>,
  );
}

const shown = () => JSON.parse(screen.getByTestId('query').textContent ?? '{}');
const requested = () => fetchMock.mock.calls.map(([input]) => urlOf(input));
const lastRequest = () => requested().at(-1)!;

beforeEach(() => {
  fetchMock.mockReset();
  fetchMock.mockImplementation((input) => {
    const url = urlOf(input);
    const page = Number(url.searchParams.get('page'));
    const pageSize = Number(url.searchParams.get('pageSize'));
    const items = Array.from({ length: Math.min(pageSize, 5) }, (_, i) => ({ id: `${page}-${i}`, name: `Thing ${i}` }));
    return Promise.resolve(new Response(JSON.stringify({ items, total: 120, page, pageSize }), { headers: { 'content-type': 'application/json' } }));
  });
  vi.stubGlobal('fetch', fetchMock);
});

afterEach(() => {
  cleanup();
  vi.useRealTimers();
  vi.unstubAllGlobals();
});

describe('the list kit', () => {
  it('reads the list state from the URL, with the defaults for what is missing or bad', async () => {
    renderAt('/things?page=3&pageSize=25&sort=name&colour=purple');
    expect(shown()).toMatchObject({ page: 3, pageSize: 25, sort: 'name', order: 'desc' });
    expect(shown().colour).toBeUndefined();
    await waitFor(() => expect(fetchMock).toHaveBeenCalled());
    expect(Object.fromEntries(lastRequest().searchParams)).toMatchObject({ page: '3', pageSize: '25', sort: 'name', order: 'desc' });
  });

  it('writes a filter change to the URL and goes back to page 1; paging keeps the filters', async () => {
    renderAt('/things?page=3');
    fireEvent.change(screen.getByLabelText('Colour'), { target: { value: 'green' } });
    await waitFor(() => expect(window.location.search).toBe('?colour=green'));
    expect(shown()).toMatchObject({ page: 1, colour: 'green' });

    fireEvent.click(await screen.findByRole('button', { name: 'Next' }));
    await waitFor(() => expect(window.location.search).toBe('?colour=green&page=2'));
    fireEvent.change(screen.getByLabelText('Per page'), { target: { value: '100' } });
    await waitFor(() => expect(new URLSearchParams(window.location.search).get('pageSize')).toBe('100'));
    expect(shown()).toMatchObject({ page: 1, pageSize: 100, colour: 'green' });
    await waitFor(() => expect(Object.fromEntries(lastRequest().searchParams)).toMatchObject({ page: '1', pageSize: '100', colour: 'green' }));

    fireEvent.click(screen.getByRole('button', { name: 'Clear filters' }));
    await waitFor(() => expect(window.location.search).toBe('?pageSize=100'));
  });

  it('sends a header click to the server as sort and order, back on page 1', async () => {
    renderAt('/things?page=2');
    await screen.findByText('Thing 0');
    fireEvent.click(screen.getByRole('button', { name: /Name/ }));
    await waitFor(() => expect(lastRequest().searchParams.get('sort')).toBe('name'));
    expect(lastRequest().searchParams.get('page')).toBe('1');
    expect(new URLSearchParams(window.location.search).get('sort')).toBe('name');
    expect(screen.getByRole('columnheader', { name: /Name/ }).getAttribute('aria-sort')).not.toBe('none');
  });

  it('searches a moment after the last key, replacing the history entry, and at once on Enter', async () => {
    vi.useFakeTimers();
    renderAt('/things?page=4');
    const before = window.history.length;
    const box = screen.getByLabelText('Search');
    const wait = (ms: number) =>
      act(async () => {
        vi.advanceTimersByTime(ms);
        await Promise.resolve();
      });
    fireEvent.change(box, { target: { value: 'ho' } });
    await wait(200);
    fireEvent.change(box, { target: { value: 'hop ' } });
    await wait(299);
    expect(window.location.search).toBe('?page=4');
    await wait(1);
    expect(window.location.search).toBe('?q=hop');
    expect(window.history.length).toBe(before);

    fireEvent.change(box, { target: { value: 'lager' } });
    fireEvent.keyDown(box, { key: 'Enter' });
    await wait(0);
    expect(window.location.search).toBe('?q=lager');
    expect(window.history.length).toBe(before + 1);

    vi.useRealTimers();
    await waitFor(() => expect(lastRequest().searchParams.get('q')).toBe('lager'));
    expect(requested().some((url) => url.searchParams.get('q') === 'ho')).toBe(false);
  });

  it('follows the URL when it changes underneath: Back restores the earlier list', async () => {
    renderAt('/things');
    fireEvent.change(screen.getByLabelText('Colour'), { target: { value: 'red' } });
    await waitFor(() => expect(window.location.search).toBe('?colour=red'));
    fireEvent.change(screen.getByLabelText('Search'), { target: { value: 'stout' } });
    fireEvent.keyDown(screen.getByLabelText('Search'), { key: 'Enter' });
    await waitFor(() => expect(window.location.search).toBe('?colour=red&q=stout'));
    act(() => window.history.back());
    await waitFor(() => expect(shown()).toMatchObject({ colour: 'red' }));
    await waitFor(() => expect(shown().q).toBeUndefined());
    expect(screen.getByLabelText<HTMLInputElement>('Search').value).toBe('');
  });
});
