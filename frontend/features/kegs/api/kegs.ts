import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { KegHistoryEntry, KegListQuery, KegUndoOfferView, KegView, TapBoardEntry } from '../../../../shared/schemas/kegs.ts';
import type { Page } from '../../../../shared/schemas/pagination.ts';
import { api } from '@/lib/api-client';

export const kegKeys = {
  all: ['kegs'] as const,
  list: (q: Partial<KegListQuery>) => [...kegKeys.all, 'list', q] as const,
  overdue: (q: object) => [...kegKeys.all, 'overdue', q] as const,
  board: () => [...kegKeys.all, 'tap-board'] as const,
  detail: (id: string) => [...kegKeys.all, 'detail', id] as const,
  history: (id: string, page: number) => [...kegKeys.all, 'detail', id, 'history', page] as const,
};

export const kegsQueryOptions = (q: Partial<KegListQuery>) =>
  queryOptions({
    queryKey: kegKeys.list(q),
    queryFn: ({ signal }) => api.get<Page<KegView>>('/api/kegs', { query: { ...q }, signal }),
    placeholderData: keepPreviousData,
  });
export const useKegs = (q: Partial<KegListQuery>, enabled = true) => useQuery({ ...kegsQueryOptions(q), enabled });

export const useOverdueKegs = (q: { page?: number; pageSize?: number } = {}) =>
  useQuery({
    queryKey: kegKeys.overdue(q),
    queryFn: ({ signal }) => api.get<Page<KegView>>('/api/kegs/overdue', { query: { ...q }, signal }),
    placeholderData: keepPreviousData,
  });

export const useTapBoard = () =>
  useQuery({ queryKey: kegKeys.board(), queryFn: ({ signal }) => api.get<{ taps: TapBoardEntry[] }>('/api/kegs/tap-board', { signal }) });

export const useKeg = (id: string) =>
  useQuery({
    queryKey: kegKeys.detail(id),
    queryFn: ({ signal }) => api.get<{ keg: KegView }>(`/api/kegs/${encodeURIComponent(id)}`, { signal }),
    enabled: Boolean(id),
  });

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
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (a: KegAction) =>
      a.action === 'level'
        ? api.patch<{ keg: KegView; undo?: KegUndoOfferView }>(`/api/kegs/${encodeURIComponent(kegId)}/level`, a.body)
        : api.post<{ keg: KegView; undo?: KegUndoOfferView }>(`/api/kegs/${encodeURIComponent(kegId)}/${a.action}`, a.body),
    onSuccess: async (data) => {
      queryClient.setQueryData(kegKeys.detail(kegId), { keg: data.keg });
      await Promise.all([
        queryClient.invalidateQueries({ queryKey: kegKeys.all }),
        queryClient.invalidateQueries({ queryKey: ['equipment'] }),
        queryClient.invalidateQueries({ queryKey: ['sanitation'] }),
      ]);
    },
  });
}

export interface MemberOption {
  id: string;
  name: string;
  email: string;
}

/** Active members, for handing a keg out. */
export const useMemberOptions = (enabled: boolean) =>
  useQuery({
    queryKey: ['users', 'member-options'],
    queryFn: ({ signal }) =>
      api
        .get<Page<MemberOption>>('/api/users', { query: { role: 'member', active: 'true', pageSize: 100, sort: 'name', order: 'asc' }, signal })
        .then((p) => p.items),
    enabled,
    staleTime: 5 * 60_000,
  });
