// @vitest-environment happy-dom
import { cleanup, render, screen } from '@testing-library/react';
import type { ReactNode } from 'react';
import { MemoryRouter } from 'react-router-dom';
import { afterEach, describe, expect, it } from 'vitest';
import { EmailLinkPage } from '@/components/layouts/email-link-page';
import { PageHeader, QueryFallback } from '@/components/layouts/page-header';

const at = (url: string, ui: ReactNode) => render(<MemoryRouter initialEntries={[url]}>{ui}</MemoryRouter>);

afterEach(cleanup);

describe('the page header', () => {
  it('gives the crumb back, the title with its badge, the intro, more lines and the actions', () => {
    at(
      '/kegs/1',
      <PageHeader parent={{ to: '/kegs', label: 'Kegs' }} title="K-07" badge={<span>Full</span>} intro="19 L · ball lock" actions={<button>Fill</button>}>
        <p>Packaged today</p>
      </PageHeader>,
    );
    expect(screen.getByRole('link', { name: 'Kegs' }).getAttribute('href')).toBe('/kegs');
    expect(screen.getByRole('navigation').textContent).toBe('Kegs / K-07');
    expect(screen.getByRole('heading', { level: 1 }).textContent).toBe('K-07 Full');
    expect(screen.getByText('19 L · ball lock')).toBeTruthy();
    expect(screen.getByText('Packaged today')).toBeTruthy();
    expect(screen.getByRole('banner').contains(screen.getByRole('button', { name: 'Fill' }))).toBe(true);
  });

  it('offers a report’s exports: saved, or opened in a new tab to read', () => {
    at(
      '/report',
      <PageHeader
        title="Trace report"
        report
        downloads={[
          { label: 'Export CSV', href: '/api/report.csv' },
          { label: 'PDF', href: '/api/report.pdf', open: true },
        ]}
      />,
    );
    expect(screen.queryByRole('navigation')).toBeNull();
    const csv = screen.getByRole('link', { name: 'Export CSV' });
    expect(csv.hasAttribute('download')).toBe(true);
    const pdf = screen.getByRole('link', { name: 'PDF' });
    expect(pdf.getAttribute('target')).toBe('_blank');
    expect(pdf.hasAttribute('download')).toBe(false);
  });

  it('shows a loader while the record comes, and what went wrong when it does not', () => {
    const { rerender } = at('/x', <QueryFallback query={{ isPending: true, error: null }} what="keg" />);
    expect(screen.getByText('Loading…')).toBeTruthy();
    rerender(
      <MemoryRouter>
        <QueryFallback query={{ isPending: false, error: new Error('Gone away') }} what="keg" />
      </MemoryRouter>,
    );
    expect(screen.getByText('This keg could not be shown')).toBeTruthy();
  });
});

describe('a page opened from an e-mail link', () => {
  const page = (
    <EmailLinkPage title="Unlock your account" intro="Unlock it to sign in again." incomplete="Open the link from the e-mail again.">
      {(token) => <p>Form for {token}</p>}
    </EmailLinkPage>
  );

  it('hands the link’s token to its form', () => {
    at('/unlock?token=%20abc%20', page);
    expect(screen.getByText('Form for abc')).toBeTruthy();
    expect(screen.getByText('Unlock it to sign in again.')).toBeTruthy();
    expect(screen.getByRole('link', { name: 'Back to sign in' })).toBeTruthy();
  });

  it('says the link is incomplete without a token, and offers no form', () => {
    at('/unlock', page);
    expect(screen.getByText('This link is incomplete')).toBeTruthy();
    expect(screen.getByText('Open the link from the e-mail again.')).toBeTruthy();
    expect(screen.queryByText(/Form for/)).toBeNull();
    expect(screen.queryByText('Unlock it to sign in again.')).toBeNull();
  });
});
