import { Link } from 'react-router-dom';
import { SectionLayout } from '@/components/layouts/section-layout';
import { buttonClasses } from '@/components/ui/button';
import { paths } from '@/config/paths';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { canOnEvery, useAppAbility } from '@/lib/ability';
import { useSessionUser } from '@/lib/auth';

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
    <SectionLayout
      title="Billing"
      intro={
        treasurer
          ? 'What is owed and how old it is, the monthly invoice run, payments, the price list and the ledger for the accountant.'
          : 'Your invoices, what is left to pay, and paying online.'
      }
      tabs={[
        { to: paths.billing, end: true, label: 'Overview', show: treasurer },
        { to: paths.billingInvoices, label: 'Invoices', show: treasurer },
        { to: paths.billingRun, label: 'Run a period', show: treasurer },
        { to: paths.billingPrices, label: 'Price list', show: treasurer },
        { to: paths.billingExports, label: 'Exports', show: treasurer },
        { to: paths.myInvoices, label: 'My invoices', show: member || !treasurer },
      ]}
    />
  );
};

export default BillingLayout;
