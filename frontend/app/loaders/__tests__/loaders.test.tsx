// @vitest-environment happy-dom
import { renderHook } from '@testing-library/react';
import type { ReactNode } from 'react';
import { MemoryRouter } from 'react-router-dom';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { defineAbilityFor } from '../../../../shared/permissions/ability.ts';
import type { Role } from '../../../../shared/permissions/roles.ts';
import type { SessionUser } from '../../../../shared/schemas/auth.ts';
import { batchesPlan, batchPlan } from '@/app/loaders/batches';
import { billingOverviewPlan } from '@/app/loaders/billing';
import { kegsPlan } from '@/app/loaders/kegs';
import { plannedQueries, prefetchLoader, type PrefetchArgs, type PrefetchPlan } from '@/app/loaders/prefetch';
import { vesselsPlan } from '@/app/loaders/sanitation';
import { todayLoader } from '@/app/loaders/today';
import { useListQuery } from '@/components/list-kit';
import { batchListQuery, getBatchesQueryOptions } from '@/features/batches/api/get-batches';
import { batchKeys } from '@/features/batches/api/keys';
import { kegListQuery, kegsQueryOptions } from '@/features/kegs/api/kegs';
import { todayKeys } from '@/features/today/api/get-today';
import { authKeys } from '@/lib/auth';
import { queryClient } from '@/lib/query-client';

const userWith = (role: Role): SessionUser => ({ id: `id-${role}`, email: `${role}@example.org`, name: role, roles: [role], units: 'metric' });

const argsFor = (search: string, role: Role = 'admin', params: PrefetchArgs['params'] = {}): PrefetchArgs => {
  const user = userWith(role);
  return { search: new URLSearchParams(search), params, user, ability: defineAbilityFor({ id: user.id, roles: user.roles }) };
};

const keysOf = (plan: PrefetchPlan, args: PrefetchArgs) => plannedQueries(plan, args).map((q) => q.queryKey);

/** The query key the list screen's own hook asks for at `address`, read through the list kit as the screen does. */
function screenKey<Q extends { page: number; pageSize: number }>(
  address: string,
  definition: Parameters<typeof useListQuery<Q>>[0],
  options: (query: Q) => { queryKey: readonly unknown[] },
) {
  const wrapper = ({ children }: { children: ReactNode }) => <MemoryRouter initialEntries={[address]}>{children}</MemoryRouter>;
  const { result } = renderHook(() => useListQuery(definition), { wrapper });
  return options(result.current.query).queryKey;
}

describe('a list loader reads the address as its screen does', () => {
  it('page, sort, order and filters in the address give the screen’s own query key', () => {
    const search = 'status=fermenting&q=amber&sort=name&order=asc&page=3&pageSize=10';
    const [key] = keysOf(batchesPlan, argsFor(search));
    expect(key).toEqual(screenKey(`/batches?${search}`, batchListQuery, getBatchesQueryOptions));
    expect(key).toEqual(batchKeys.list({ ...batchListQuery.defaults, status: 'fermenting', q: 'amber', sort: 'name', order: 'asc', page: 3, pageSize: 10 }));
  });

  it('an address without parameters gives the list’s defaults (newest batches first)', () => {
    const [key] = keysOf(batchesPlan, argsFor(''));
    expect(key).toEqual(batchKeys.list(batchListQuery.defaults));
    expect(batchListQuery.defaults).toMatchObject({ page: 1, order: 'desc' });
    expect(key).toEqual(screenKey('/batches', batchListQuery, getBatchesQueryOptions));
  });

  it('bad values in a hand-edited address fall back to their defaults, as on the screen', () => {
    const search = 'page=abc&sort=nonsense&order=sideways&pageSize=5';
    const [key] = keysOf(kegsPlan, argsFor(search));
    expect(key).toEqual(screenKey(`/kegs?${search}`, kegListQuery, kegsQueryOptions));
    expect(key).toEqual(kegsQueryOptions({ ...kegListQuery.defaults, pageSize: 5 }).queryKey);
  });

  it('a detail loader takes the id from the path', () => {
    expect(keysOf(batchPlan, argsFor('', 'member', { batchId: 'b-1' }))).toEqual([batchKeys.detail('b-1')]);
  });
});

describe('a loader asks only for what the screen would ask for', () => {
  it('the books’ totals go only to whoever may read every invoice', () => {
    expect(keysOf(billingOverviewPlan, argsFor('', 'member'))).toEqual([]);
    expect(keysOf(billingOverviewPlan, argsFor('', 'treasurer'))).toHaveLength(2);
  });

  it('the sanitation vessels go only to whoever may read sanitation cycles', () => {
    expect(keysOf(vesselsPlan, argsFor('', 'member'))).toEqual([]);
    expect(keysOf(vesselsPlan, argsFor('state=any', 'brewer_on_duty'))).toHaveLength(1);
  });
});

describe('prefetchLoader', () => {
  afterEach(() => {
    vi.unstubAllGlobals();
    queryClient.clear();
  });

  const stubFetch = (answer: (url: string) => Response) => {
    const urls: string[] = [];
    vi.stubGlobal(
      'fetch',
      vi.fn((url: string) => {
        urls.push(url);
        return Promise.resolve(answer(url));
      }),
    );
    return urls;
  };
  const json = (body: unknown, status = 200) => new Response(JSON.stringify(body), { status, headers: { 'Content-Type': 'application/json' } });
  const run = (loader: typeof todayLoader) =>
    loader({ request: new Request('http://localhost/'), url: new URL('http://localhost/'), pattern: '/', params: {}, context: undefined });

  it('puts the screen’s data in the cache before the screen renders', async () => {
    queryClient.setQueryData(authKeys.me, userWith('member'));
    const urls = stubFetch(() => json({ cards: [] }));
    await run(todayLoader);
    expect(urls).toEqual(['/api/today']);
    expect(queryClient.getQueryData(todayKeys.all)).toEqual({ cards: [] });
  });

  it('a failed request never fails the navigation: the error waits in the cache for the screen', async () => {
    queryClient.setQueryData(authKeys.me, userWith('member'));
    const urls = stubFetch(() => json({ title: 'Broken', status: 500 }, 500));
    await expect(run(todayLoader)).resolves.toBeNull();
    // One request: the navigation does not wait out the retries.
    expect(urls).toEqual(['/api/today']);
    expect(queryClient.getQueryState(todayKeys.all)?.status).toBe('error');
  });

  it('nobody signed in: nothing is fetched (the frame sends them to sign in)', async () => {
    const urls = stubFetch((url) => (url.includes('/api/auth/me') ? json({ title: 'Unauthorized', status: 401 }, 401) : json({})));
    await expect(run(prefetchLoader(() => [{ queryKey: ['never'], queryFn: () => 1 }]))).resolves.toBeNull();
    expect(urls).toEqual(['/api/auth/me']);
  });
});
