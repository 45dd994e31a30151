import type { ReactNode } from 'react';
import { NavLink, Outlet } from 'react-router-dom';
import { cn } from '@/utils/cn';

/** One tab of a section: where it goes, its label, and whether this person sees it. */
export interface SectionTab {
  to: string;
  label: string;
  /** Active only on exactly this path (the section's first tab). */
  end?: boolean;
  /** Left out when false. */
  show?: boolean;
}

const tabClass = ({ isActive }: { isActive: boolean }) =>
  cn(
    '-mb-px inline-flex min-h-12 items-center border-b-2 px-3 text-sm font-medium whitespace-nowrap no-underline hover:no-underline',
    isActive ? 'border-copper text-ink' : 'border-transparent text-ink-muted hover:border-line-strong hover:text-ink',
  );

/**
 * A section of the app with its own tabs (Billing, Bookings, Kegs, Members, Sanitation): the heading and a line
 * on what it holds, an optional action beside them, the tab strip (it wraps on phones, so every tab stays on
 * screen), then the tab's own screen.
 */
export const SectionLayout = ({ title, intro, action, tabs }: { title: string; intro: ReactNode; action?: ReactNode; tabs: SectionTab[] }) => {
  const shown = tabs.filter((t) => t.show !== false);
  return (
    <div className="flex flex-col gap-4">
      <header className="flex flex-wrap items-start justify-between gap-3">
        <div>
          <h1 className="text-2xl">{title}</h1>
          <p className="mt-1 text-ink-muted">{intro}</p>
        </div>
        {action}
      </header>
      {shown.length ? (
        <nav aria-label={`${title} sections`} className="flex flex-wrap gap-x-1 border-b border-line">
          {shown.map((t) => (
            <NavLink key={t.to} to={t.to} end={t.end} className={tabClass}>
              {t.label}
            </NavLink>
          ))}
        </nav>
      ) : null}
      <Outlet />
    </div>
  );
};
