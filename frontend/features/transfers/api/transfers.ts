import { useQuery } from '@tanstack/react-query';
import type { CreateTransferInput, TransferCandidate, TransferView } from '../../../../shared/schemas/transfers.ts';
import { api } from '@/lib/api-client';
import { useApiMutation } from '@/lib/api-mutation';
import { batchKeys } from '@/features/batches/api/keys';
import { equipmentKeys } from '@/features/equipment/api/keys';
import { kegKeys } from '@/features/kegs/api/keys';
import { sanitationKeys } from '@/features/sanitation/api/keys';
import { transferKeys } from '@/features/transfers/api/keys';

export const useTransferCandidates = (enabled = true) =>
  useQuery({
    queryKey: transferKeys.candidates(),
    queryFn: ({ signal }) => api.get<{ items: TransferCandidate[] }>('/api/transfers/candidates', { signal }).then((r) => r.items),
    enabled,
  });

export const useRecordTransfer = () =>
  useApiMutation(
    (input: CreateTransferInput) => api.post<{ transfer: TransferView; warnings: string[] }>('/api/transfers', input),
    [transferKeys.all, kegKeys.all, equipmentKeys.all, sanitationKeys.all, batchKeys.all],
  );
