import type { ReactNode } from 'react';
import { Link } from 'react-router-dom';
import { Alert } from '@/components/ui/alert';
import { buttonClasses } from '@/components/ui/button';
import { PageLoader } from '@/components/ui/spinner';
import { problemMessage } from '@/lib/api-client';
import { cn } from '@/utils/cn';

export interface DownloadLink {
  label: string;
  href: string;
  /** Opened in a new tab to read (a PDF) instead of saved. */
  open?: boolean;
}

/** A page's exports side by side: CSV, XLSX, PDF. */
export const DownloadLinks = ({ links }: { links: readonly DownloadLink[] }) => (
  <div className="flex gap-2">
    {links.map(({ label, href, open = false }) => (
      <a key={label} className={buttonClasses('secondary')} href={href} {...(open ? { target: '_blank', rel: 'noreferrer' } : { download: true })}>
        {label}
      </a>
    ))}
  </div>
);

export interface PageHeaderProps {
  /** The page this one sits under: a crumb back to it above the heading. */
  parent?: { to: string; label: string };
  /** This page's crumb; the title when left out. */
  crumb?: ReactNode;
  title: ReactNode;
  /** A state or status badge beside the title. */
  badge?: ReactNode;
  /** The line under the title. */
  intro?: ReactNode;
  /** A report page: a smaller intro, and the actions level with the title's foot instead of its top. */
  report?: boolean;
  /** Buttons and links on the right. */
  actions?: ReactNode;
  /** The page's exports, as buttons on the right. */
  downloads?: readonly DownloadLink[];
  /** More lines under the intro. */
  children?: ReactNode;
}

/** The top of a page: the crumb back to where it sits, its title with a badge, a line about it and its actions. */
export const PageHeader = ({ parent, crumb, title, badge, intro, report = false, actions, downloads = [], children }: PageHeaderProps) => (
  <>
    {parent ? (
      <nav className="text-sm">
        <Link to={parent.to}>{parent.label}</Link> <span className="text-ink-faint">/</span> {crumb ?? title}
      </nav>
    ) : null}
    <header className={cn('flex flex-wrap justify-between gap-3', report ? 'items-end' : 'items-start')}>
      <div>
        <h1 className="flex flex-wrap items-center gap-3 text-2xl">
          {title}
          {badge ? <> {badge}</> : null}
        </h1>
        {intro ? <p className={report ? 'text-sm text-ink-muted' : 'mt-1 text-ink-muted'}>{intro}</p> : null}
        {children}
      </div>
      {actions}
      {downloads.length ? <DownloadLinks links={downloads} /> : null}
    </header>
  </>
);

/** A detail page's query that has not given its record: the page loader, or what went wrong. */
export const QueryFallback = ({ query, what }: { query: { isPending: boolean; error: unknown }; what: string }) =>
  query.isPending ? (
    <PageLoader />
  ) : (
    <Alert tone="error" title={`This ${what} could not be shown`}>
      {problemMessage(query.error)}
    </Alert>
  );
