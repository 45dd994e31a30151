// @vitest-environment happy-dom
import { renderHook } from '@testing-library/react';
import type { ReactNode } from 'react';
import { MemoryRouter } from 'react-router-dom';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { defineAbilityFor } from '../../../../shared/permissions/ability.ts';
import type { Role } from '../../../../shared/permissions/roles.ts';
import type { SessionUser } from '../../../../shared/schemas/auth.ts';
import { settingKeys as settingSectionKeys } from '../../../../shared/schemas/settings.ts';
import { auditLoader, auditPlan } from '@/app/loaders/audit';
import { batchesPlan, batchPlan, productionRecordsPlan, traceReportPlan } from '@/app/loaders/batches';
import { billingOverviewPlan } from '@/app/loaders/billing';
import { allBookingsPlan, myBookingsPlan } from '@/app/loaders/bookings';
import { maintenancePlan } from '@/app/loaders/cellar';
import { kegsPlan } from '@/app/loaders/kegs';
import { outboxPlan } from '@/app/loaders/members';
import { plannedQueries, prefetchLoader, type PrefetchArgs, type PrefetchPlan } from '@/app/loaders/prefetch';
import { vesselsPlan } from '@/app/loaders/sanitation';
import { settingsPlan } from '@/app/loaders/settings';
import { todayLoader } from '@/app/loaders/today';
import { useListQuery } from '@/components/list-kit';
import { batchListQuery, getBatchesQueryOptions } from '@/features/batches/api/get-batches';
import { auditListQuery, auditPeopleQuery, auditTrailRequest, getAuditTrailQueryOptions } from '@/features/audit/api/get-audit';
import { auditKeys } from '@/features/audit/api/keys';
import { batchKeys } from '@/features/batches/api/keys';
import { bookingKeys } from '@/features/bookings/api/keys';
import { maintenanceListQuery, maintenanceListQueryOptions } from '@/features/equipment/api/inspections';
import { mailboxKeys } from '@/features/mailbox/api/keys';
import { settingKeys } from '@/features/settings/api/setting';
import { userKeys } from '@/features/users/api/keys';
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

describe('the loaders of the lists and reports', () => {
  afterEach(() => {
    vi.useRealTimers();
  });

  it('the audit trail reads its filters as the screen does, days as the instants they start and end', () => {
    const search = 'subjectType=Invoice&from=2026-03-01&to=2026-03-31&sort=action&order=asc&page=2';
    const [trail, people] = keysOf(auditPlan, argsFor(search));
    expect(trail).toEqual(screenKey(`/audit?${search}`, auditListQuery, (q) => getAuditTrailQueryOptions(auditTrailRequest(q))));
    expect(trail).toEqual(
      auditKeys.list({
        ...auditTrailRequest(auditListQuery.defaults),
        subjectType: 'Invoice',
        sort: 'action',
        order: 'asc',
        page: 2,
        from: new Date('2026-03-01T00:00:00').toISOString(),
        to: new Date('2026-04-01T00:00:00').toISOString(),
      }),
    );
    expect(people).toEqual(userKeys.list(auditPeopleQuery));
    expect(keysOf(auditPlan, argsFor(search, 'treasurer'))).toEqual([]);
  });

  it('maintenance reads its status and kind filters from the address', () => {
    const search = 'status=overdue&equipmentKind=keg&sort=code';
    const [key] = keysOf(maintenancePlan, argsFor(search, 'brewer_on_duty'));
    expect(key).toEqual(screenKey(`/cellar/maintenance?${search}`, maintenanceListQuery, maintenanceListQueryOptions));
    expect(key).toEqual(maintenanceListQueryOptions({ ...maintenanceListQuery.defaults, status: 'overdue', equipmentKind: 'keg', sort: 'code' }).queryKey);
  });

  it('production records and the trace report ask for the range their screens open on, from the day it is', () => {
    vi.useFakeTimers({ toFake: ['Date'] });
    vi.setSystemTime(new Date('2027-01-20T08:00:00Z'));
    expect(keysOf(productionRecordsPlan, argsFor('', 'member'))).toEqual([batchKeys.productionRecords('2026-10', '2027-01')]);
    expect(keysOf(traceReportPlan, argsFor('', 'brewer_on_duty'))).toEqual([batchKeys.traceReport('2026-10-22', '2027-01-20')]);
    vi.setSystemTime(new Date('2028-03-01T23:30:00Z'));
    expect(keysOf(productionRecordsPlan, argsFor('', 'member'))).toEqual([batchKeys.productionRecords('2027-12', '2028-03')]);
    expect(keysOf(traceReportPlan, argsFor('', 'member'))).toEqual([batchKeys.traceReport('2027-12-02', '2028-03-01')]);
  });

  it('settings asks for every section, for whoever may read the settings', () => {
    expect(keysOf(settingsPlan, argsFor('', 'treasurer'))).toEqual(settingSectionKeys.map((key) => settingKeys.one(key)));
    expect(keysOf(settingsPlan, argsFor('', 'brewer_on_duty'))).toHaveLength(settingSectionKeys.length);
    expect(keysOf(settingsPlan, argsFor('', 'member'))).toEqual([]);
  });

  it('the bookings lists ask for upcoming bookings from an hour ago, to the minute, or every booking newest first', () => {
    vi.useFakeTimers({ toFake: ['Date'] });
    vi.setSystemTime(new Date('2027-05-04T10:17:42Z'));
    const upcoming = { page: 1, pageSize: 25, sort: 'startsAt', order: 'asc', includeCancelled: true, from: '2027-05-04T09:17:00.000Z' };
    expect(keysOf(myBookingsPlan, argsFor('', 'member'))).toEqual([bookingKeys.list({ mine: true, ...upcoming })]);
    expect(keysOf(myBookingsPlan, argsFor('past=true&page=3', 'member'))).toEqual([
      bookingKeys.list({ mine: true, page: 3, pageSize: 25, sort: 'startsAt', order: 'desc', includeCancelled: true }),
    ]);
    expect(keysOf(allBookingsPlan, argsFor('', 'brewer_on_duty'))).toEqual([bookingKeys.list({ mine: false, ...upcoming })]);
    expect(keysOf(allBookingsPlan, argsFor('', 'member'))).toEqual([]);
  });

  it('the outbox asks for its page, for whoever may read it', () => {
    const [key] = keysOf(outboxPlan, argsFor('page=2&pageSize=10&message=m-1'));
    expect(key).toEqual(mailboxKeys.list({ page: 2, pageSize: 10 }));
    expect(keysOf(outboxPlan, argsFor('', 'treasurer'))).toEqual([]);
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

  it('sends every request of a screen at once (the audit trail and the people of its filter)', async () => {
    queryClient.setQueryData(authKeys.me, userWith('admin'));
    const pending: ((r: Response) => void)[] = [];
    const urls: string[] = [];
    vi.stubGlobal(
      'fetch',
      vi.fn((url: string) => {
        urls.push(url);
        return new Promise<Response>((resolve) => pending.push(resolve));
      }),
    );
    const done = run(auditLoader);
    await vi.waitFor(() => expect(urls).toHaveLength(2));
    expect(urls.map((u) => u.split('?')[0]).sort()).toEqual(['/api/audit', '/api/users']);
    for (const answer of pending) answer(json({ items: [], total: 0, page: 1, pageSize: 50 }));
    await expect(done).resolves.toBeNull();
  });

  it('nobody signed in: nothing is fetched (the frame sends them to sign in)', async () => {
    const urls = stubFetch((url) => (url.includes('/api/auth/me') ? json({ title: 'Unauthorized', status: 401 }, 401) : json({})));
    await expect(run(prefetchLoader(() => [{ queryKey: ['never'], queryFn: () => 1 }]))).resolves.toBeNull();
    expect(urls).toEqual(['/api/auth/me']);
  });
});
