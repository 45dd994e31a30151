import type { ReactNode } from 'react';
import type { SettingKey } from '../../../../shared/schemas/settings.ts';
import { Alert } from '@/components/ui/alert';
import { Spinner } from '@/components/ui/spinner';
import { useSetting } from '@/features/settings/api/setting';
import { problemMessage } from '@/lib/api-client';
import { formatDateTime } from '@/utils/format';

export interface SettingLoaderProps<T> {
  settingKey: SettingKey;
  /** What is loading, for the spinner: "the booking rules". */
  what: string;
  /** The section's form, given the saved value. */
  children: (value: T) => ReactNode;
}

/** Loads one Settings section, shows its form with the saved value, and says who changed it last. */
export function SettingLoader<T>({ settingKey, what, children }: SettingLoaderProps<T>) {
  const setting = useSetting<T>(settingKey);
  if (setting.isPending) return <Spinner label={`Loading ${what}`} />;
  if (setting.isError) return <Alert tone="error">{problemMessage(setting.error)}</Alert>;
  return (
    <>
      {children(setting.data.value)}
      {setting.data.updatedBy ? (
        <p className="mt-2 text-xs text-ink-muted">
          Last changed by {setting.data.updatedBy.name}, {formatDateTime(setting.data.updatedAt)}.
        </p>
      ) : null}
    </>
  );
}
