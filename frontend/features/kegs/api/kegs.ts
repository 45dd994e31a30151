import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import {
  kegListQuerySchema,
  type KegHistoryEntry,
  type KegListQuery,
  type KegUndoOfferView,
  type KegView,
  type TapBoardEntry,
} from '../../../../shared/schemas/kegs.ts';
import type { Page } from '../../../../shared/schemas/pagination.ts';
import { defineListQuery, pageQueryOptions, pagingQuerySchema } from '@/components/list-kit';
import { equipmentKeys } from '@/features/equipment/api/keys';
import { kegKeys } from '@/features/kegs/api/keys';
import { sanitationKeys } from '@/features/sanitation/api/keys';
import { userKeys } from '@/features/users/api/keys';
import { api } from '@/lib/api-client';
import { useApiMutation } from '@/lib/api-mutation';

/** The fleet list's state in the URL. */
export const kegListQuery = defineListQuery(kegListQuerySchema);
/** The overdue list only pages, 25 at a time. */
export const overdueListQuery = defineListQuery(pagingQuerySchema(25));

export const kegsQueryOptions = (q: Partial<KegListQuery>) => pageQueryOptions<KegView>(kegKeys.list(q), '/api/kegs', q);
export const useKegs = (q: Partial<KegListQuery>, enabled = true) => useQuery({ ...kegsQueryOptions(q), enabled });

export const overdueKegsQueryOptions = (q: { page?: number; pageSize?: number } = {}) => pageQueryOptions<KegView>(kegKeys.overdue(q), '/api/kegs/overdue', q);
export const useOverdueKegs = (q: { page?: number; pageSize?: number } = {}) => useQuery(overdueKegsQueryOptions(q));

export const tapBoardQueryOptions = () =>
  queryOptions({ queryKey: kegKeys.board(), queryFn: ({ signal }) => api.get<{ taps: TapBoardEntry[] }>('/api/kegs/tap-board', { signal }) });
export const useTapBoard = () => useQuery(tapBoardQueryOptions());

export const kegQueryOptions = (id: string) =>
  queryOptions({ queryKey: kegKeys.detail(id), queryFn: ({ signal }) => api.get<{ keg: KegView }>(`/api/kegs/${encodeURIComponent(id)}`, { signal }) });
export const useKeg = (id: string) => useQuery({ ...kegQueryOptions(id), enabled: Boolean(id) });

export const useKegHistory = (id: string, page: number, enabled = true) =>
  useQuery({
    queryKey: kegKeys.history(id, page),
    queryFn: ({ signal }) => api.get<Page<KegHistoryEntry>>(`/api/kegs/${encodeURIComponent(id)}/history`, { query: { page, pageSize: 50 }, signal }),
    placeholderData: keepPreviousData,
    enabled,
  });

type KegAction =
  | { action: 'check-out'; body: { memberId: string; dueAt: string; note?: string } }
  | { action: 'return'; body: { note?: string } }
  | { action: 'move'; body: { to: 'cellar' | 'cold_room' | 'missing'; tapId?: string | null; note?: string } }
  | { action: 'empty'; body: { note?: string; dumped?: boolean } }
  | { action: 'level'; body: { remainingLiters: number } }
  | { action: 'undo'; body: { actionId?: string } };

/** Check-out, return, moves, emptying, levels and undo: each answers with the keg as it is now (a return, an emptying or a dump with its undo offer). */
export function useKegAction(kegId: string) {
  return useApiMutation(
    (a: KegAction) =>
      a.action === 'level'
        ? api.patch<{ keg: KegView; undo?: KegUndoOfferView }>(`/api/kegs/${encodeURIComponent(kegId)}/level`, a.body)
        : api.post<{ keg: KegView; undo?: KegUndoOfferView }>(`/api/kegs/${encodeURIComponent(kegId)}/${a.action}`, a.body),
    [kegKeys.all, equipmentKeys.all, sanitationKeys.all],
    (data, queryClient) => queryClient.setQueryData(kegKeys.detail(kegId), { keg: data.keg }),
  );
}

export interface MemberOption {
  id: string;
  name: string;
  email: string;
}

/** Active members, for handing a keg out. */
export const useMemberOptions = (enabled: boolean) =>
  useQuery({
    queryKey: userKeys.memberOptions(),
    queryFn: ({ signal }) =>
      api
        .get<Page<MemberOption>>('/api/users', { query: { role: 'member', active: 'true', pageSize: 100, sort: 'name', order: 'asc' }, signal })
        .then((p) => p.items),
    enabled,
    staleTime: 5 * 60_000,
  });
