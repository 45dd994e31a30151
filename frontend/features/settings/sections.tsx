import type { ComponentType } from 'react';
import type { SettingKey } from '../../../shared/schemas/settings.ts';
import { settingSections } from '../../../shared/schemas/settings.ts';
import { BookingRulesSection } from '@/features/settings/components/booking-rules-form';
import { FermentationSettingsSection } from '@/features/batches/components/fermentation-settings-form';
import { ShelfLifeSettingsSection } from '@/features/batches/components/shelf-life-settings-form';
import { CarbonationSettingsSection, SanitationSettingsSection } from '@/features/settings/components/cellar-settings-forms';
import { PressureSafetySettingsSection } from '@/features/equipment/components/pressure-safety-settings-form';

/**
 * The Settings screen's sections, in order. Each capability adds one entry here: its key in the
 * `setting` table (title and description come from shared/schemas/settings.ts) and its form.
 */
export interface SettingsScreenSection {
  key: SettingKey;
  Component: ComponentType<{ canEdit: boolean }>;
}

export const settingsScreenSections: SettingsScreenSection[] = [
  { key: 'booking_rules', Component: BookingRulesSection },
  { key: 'fermentation', Component: FermentationSettingsSection },
  { key: 'sanitation', Component: SanitationSettingsSection },
  { key: 'carbonation', Component: CarbonationSettingsSection },
  { key: 'shelf_life', Component: ShelfLifeSettingsSection },
  { key: 'pressure_safety', Component: PressureSafetySettingsSection },
];

export const sectionTitle = (key: SettingKey) => settingSections[key].title;
export const sectionDescription = (key: SettingKey) => settingSections[key].description;
