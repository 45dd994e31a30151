import { hash } from '@node-rs/argon2';
import type { Database } from '../../backend/db/database.ts';
import type { Role } from '../../shared/permissions/roles.ts';
import type { DemoCalendar } from './demo-calendar.ts';
import { seedId } from './ids.ts';

export const DEMO_PASSWORD = 'cellar-demo';

// The invented members of Larkspur Yard Brewing Co-op.
const memberNames = [
  'Maren Holloway',
  'Tobias Quill',
  'Ines Farrow',
  'Caspian Reyes',
  'Odile Marsh',
  'Bram Whitlock',
  'Priya Castellan',
  'Jonah Feld',
  'Lotte Brannigan',
  'Amadou Kestrel',
  'Saskia Thorne',
  'Felix Arden',
  'Rosalind Oakes',
  'Henrik Dale',
  'Noor Ashby',
  'Wendell Pike',
  'Clementine Vo',
  'Dario Lindqvist',
  'Hattie Morrow',
  'Emeka Sorrel',
  'Ysolde Grant',
  'Rafferty Bell',
  'Junie Calder',
  'Osman Wilde',
];

export interface SeedUser {
  key: string;
  email: string;
  name: string;
  roles: Role[];
}

export const demoUsers: SeedUser[] = [
  { key: 'admin', email: 'admin@example.org', name: 'Greta Alder', roles: ['admin'] },
  { key: 'treasurer', email: 'treasurer@example.org', name: 'Milo Fenwick', roles: ['treasurer'] },
  { key: 'brewer', email: 'brewer@example.org', name: 'Ada Kettleby', roles: ['brewer_on_duty'] },
  ...memberNames.map((name, i): SeedUser => ({
    key: i === 0 ? 'member' : `member${i + 1}`,
    email: i === 0 ? 'member@example.org' : `member${i + 1}@example.org`,
    name,
    // Two members also take turns on the brewers' rota.
    roles: i === 4 || i === 9 ? ['member', 'brewer_on_duty'] : ['member'],
  })),
];

export const userId = (key: string) => seedId('user', key);

export async function seed(db: Database, cal: DemoCalendar): Promise<void> {
  // One hash for the shared demo password keeps seeding fast; real accounts each get their own salt.
  const passwordHash = await hash(DEMO_PASSWORD);
  await db
    .insertInto('app_user')
    .values(
      demoUsers.map((u) => ({
        id: userId(u.key),
        email: u.email,
        name: u.name,
        roles: u.roles,
        password_hash: passwordHash,
        units: u.key === 'member2' ? ('us' as const) : ('metric' as const),
        created_at: cal.at('2026-08-01T09:00:00Z'),
      })),
    )
    .onConflict((oc) => oc.doNothing())
    .execute();
}
