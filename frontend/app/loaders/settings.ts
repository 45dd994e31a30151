import { settingKeys } from '../../../shared/schemas/settings.ts';
import { prefetchLoader, type PrefetchPlan } from '@/app/loaders/prefetch';
import { getSettingQueryOptions } from '@/features/settings/api/setting';

/** Every section of Settings, each its own request; for whoever may read the settings. */
export const settingsPlan: PrefetchPlan = ({ ability }) => (ability.can('read', 'Setting') ? settingKeys.map((key) => getSettingQueryOptions(key)) : []);

export const settingsLoader = prefetchLoader(settingsPlan);
