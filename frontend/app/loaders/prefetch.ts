import type { QueryKey } from '@tanstack/react-query';
import type { LoaderFunction, Params, ShouldRevalidateFunction } from 'react-router-dom';
import { defineAbilityFor, type AppAbility } from '../../../shared/permissions/ability.ts';
import type { SessionUser } from '../../../shared/schemas/auth.ts';
import { getMeQueryOptions } from '@/lib/auth';
import { queryClient } from '@/lib/query-client';

/** What a screen's prefetch plan reads: the address it is going to and who is going there. */
export interface PrefetchArgs {
  search: URLSearchParams;
  params: Params;
  user: SessionUser;
  ability: AppAbility;
}

/** One query to have in the cache: the very options the screen's hook passes to `useQuery`. */
export interface PrefetchQuery {
  queryKey: QueryKey;
  queryFn?: unknown;
}

/** A screen's queries for an address; `false` (or nothing) for one the screen would not send either. */
export type PrefetchPlan = (args: PrefetchArgs) => readonly (PrefetchQuery | false | null | undefined)[];

/**
 * How long a navigation waits for its data before showing the screen anyway; the screen then waits for
 * the same request itself, with its spinner.
 */
export const prefetchWaitMs = 1500;

/** Resolves when `work` settles or after `ms`, whichever comes first; never rejects. */
function settleWithin(work: Promise<unknown>, ms: number): Promise<void> {
  return new Promise<void>((resolve) => {
    const timer = setTimeout(resolve, ms);
    void work.finally(() => {
      clearTimeout(timer);
      resolve();
    });
  });
}

/** The queries of a plan for one address, as the plan gives them (for tests and the loader alike). */
export function plannedQueries(plan: PrefetchPlan, args: PrefetchArgs): PrefetchQuery[] {
  return plan(args).filter((q): q is PrefetchQuery => Boolean(q));
}

/**
 * A route loader that fills the query cache with the screen's data while the screen's code is still on
 * its way. It never fails the navigation: a failed request stays in the cache as an error, and the
 * screen shows it with its Retry as it always has (asking once more on mount). Nobody signed in: nothing
 * to fetch, the frame's loader sends them to sign in.
 */
export function prefetchLoader(plan: PrefetchPlan): LoaderFunction {
  return async ({ request, params }) => {
    const user = await queryClient.ensureQueryData(getMeQueryOptions()).catch(() => null);
    if (!user) return null;
    const args = { search: new URL(request.url).searchParams, params, user, ability: defineAbilityFor({ id: user.id, roles: user.roles }) };
    const fetches = plannedQueries(plan, args).map((query) =>
      // The screen retries on mount; the navigation itself should not wait out the retries.
      queryClient.ensureQueryData({ ...(query as Parameters<typeof queryClient.ensureQueryData>[0]), retry: false }).catch(() => undefined),
    );
    await settleWithin(Promise.all(fetches), prefetchWaitMs);
    return null;
  };
}

/**
 * A screen's loader runs when it is entered (or its path changes, another batch say), not when the
 * screen changes its own search parameters: sorting, filtering and paging are the list's own queries,
 * which keep the rows shown until the next page is in.
 */
export const onEntryOnly: ShouldRevalidateFunction = ({ currentUrl, nextUrl, defaultShouldRevalidate }) =>
  currentUrl.pathname !== nextUrl.pathname && defaultShouldRevalidate;
