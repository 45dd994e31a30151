import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import type { Page } from '../../../../shared/schemas/pagination.ts';
import { mailboxKeys } from '@/features/mailbox/api/keys';
import { api } from '@/lib/api-client';

/** One message caught by the development mail server. */
export interface MailboxMessage {
  id: string;
  to: string | string[];
  from: string;
  subject: string;
  text: string;
  receivedAt: string;
}

export interface MailboxQuery {
  page: number;
  pageSize: number;
}

/** Admin only; 404 when the server is not in development mode. */
export const getMailbox = (query: MailboxQuery, signal?: AbortSignal) =>
  api.get<Page<MailboxMessage>>('/api/dev/mailbox', { query: { ...query }, ...(signal ? { signal } : {}) });

export const getMailboxQueryOptions = (query: MailboxQuery) =>
  queryOptions({
    queryKey: mailboxKeys.list(query),
    queryFn: ({ signal }) => getMailbox(query, signal),
    placeholderData: keepPreviousData,
    staleTime: 5_000,
  });

export function useMailbox(query: MailboxQuery) {
  return useQuery(getMailboxQueryOptions(query));
}
