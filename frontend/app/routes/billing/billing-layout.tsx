import { Link, NavLink, Outlet } from 'react-router-dom';
import { buttonClasses } from '@/components/ui/button';
import { paths } from '@/config/paths';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { canOnEvery, useAppAbility } from '@/lib/ability';
import { useSessionUser } from '@/lib/auth';
import { cn } from '@/utils/cn';

const tabClass = ({ isActive }: { isActive: boolean }) =>
  cn(
    '-mb-px inline-flex min-h-11 items-center border-b-2 px-3 text-sm font-medium whitespace-nowrap no-underline hover:no-underline md:min-h-9 pointer-coarse:min-h-11',
    isActive ? 'border-copper text-ink' : 'border-transparent text-ink-muted hover:border-line-strong hover:text-ink',
  );

const NotForYou = () => {
  useDocumentTitle('Not for your role');
  return (
    <section className="max-w-xl">
      <h1 className="text-2xl">Not for your role</h1>
      <p className="mt-2 text-ink-muted">Billing is for members (their own invoices) and the treasurer. The cellar rota does not see money.</p>
      <Link to={paths.today} className={buttonClasses('secondary', 'md', 'mt-6')}>
        Go to Today
      </Link>
    </section>
  );
};

/** Billing: the treasurer's books, and each member's own invoices. */
const BillingLayout = () => {
  const ability = useAppAbility();
  const user = useSessionUser();
  if (!ability.can('read', 'Invoice')) return <NotForYou />;
  const treasurer = canOnEvery(ability, 'read', 'Invoice');
  const member = Boolean(user?.roles.includes('member'));
  return (
    <div className="flex flex-col gap-4">
      <header>
        <h1 className="text-2xl">Billing</h1>
        <p className="mt-1 text-ink-muted">
          {treasurer
            ? 'What is owed and how old it is, the monthly invoice run, payments, the price list and the ledger for the accountant.'
            : 'Your invoices, what is left to pay, and paying online.'}
        </p>
      </header>
      <nav aria-label="Billing sections" className="flex flex-wrap gap-x-1 border-b border-line">
        {treasurer ? (
          <>
            <NavLink to={paths.billing} end className={tabClass}>
              Overview
            </NavLink>
            <NavLink to={paths.billingInvoices} className={tabClass}>
              Invoices
            </NavLink>
            <NavLink to={paths.billingRun} className={tabClass}>
              Run a period
            </NavLink>
            <NavLink to={paths.billingPrices} className={tabClass}>
              Price list
            </NavLink>
            <NavLink to={paths.billingExports} className={tabClass}>
              Exports
            </NavLink>
          </>
        ) : null}
        {member || !treasurer ? (
          <NavLink to={paths.myInvoices} className={tabClass}>
            My invoices
          </NavLink>
        ) : null}
      </nav>
      <Outlet />
    </div>
  );
};

export default BillingLayout;
