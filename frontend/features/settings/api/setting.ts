import { queryOptions, useQuery } from '@tanstack/react-query';
import type { SettingKey, SettingValue } from '../../../../shared/schemas/settings.ts';
import { api } from '@/lib/api-client';
import { useApiMutation } from '@/lib/api-mutation';
import { bookingKeys } from '@/features/bookings/api/keys';

export const settingKeys = {
  all: ['settings'] as const,
  one: (key: SettingKey) => [...settingKeys.all, key] as const,
};

export const getSettingQueryOptions = <T>(key: SettingKey) =>
  queryOptions({
    queryKey: settingKeys.one(key),
    queryFn: ({ signal }) => api.get<SettingValue<T>>(`/api/settings/${key}`, { signal }),
  });

export function useSetting<T>(key: SettingKey) {
  return useQuery(getSettingQueryOptions<T>(key));
}

/** Saves one section; the server checks it with the same schema the form used. */
export const useSaveSetting = <T>(key: SettingKey) =>
  useApiMutation(
    (value: T) => api.put<SettingValue<T>>(`/api/settings/${key}`, value),
    [],
    (saved, queryClient) => {
      queryClient.setQueryData(settingKeys.one(key), saved);
      void queryClient.invalidateQueries({ queryKey: bookingKeys.rules() });
    },
  );
