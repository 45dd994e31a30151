import { Navigate } from 'react-router-dom';
import { Alert } from '@/components/ui/alert';
import { Spinner } from '@/components/ui/spinner';
import { paths } from '@/config/paths';
import { useBillingProfile, usePrices } from '@/features/billing/api/price-list';
import { BillingProfileForm } from '@/features/billing/components/billing-profile-form';
import { PriceListEditor } from '@/features/billing/components/price-list-editor';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { useAppAbility } from '@/lib/ability';
import { problemMessage } from '@/lib/api-client';

const PricesRoute = () => {
  useDocumentTitle('Price list');
  const ability = useAppAbility();
  const prices = usePrices();
  const profile = useBillingProfile();
  if (!ability.can('read', 'PriceList')) return <Navigate to={paths.myInvoices} replace />;
  if (prices.isPending || profile.isPending) return <Spinner className="size-5 text-copper" />;
  if (prices.isError || profile.isError) return <Alert tone="error">{problemMessage(prices.error ?? profile.error)}</Alert>;
  return (
    <div className="flex flex-col gap-8">
      <PriceListEditor data={prices.data} />
      <section aria-labelledby="profile-title" className="flex flex-col gap-3">
        <h2 id="profile-title" className="text-base">
          Invoice header and how to pay
        </h2>
        <BillingProfileForm profile={profile.data} />
      </section>
    </div>
  );
};

export default PricesRoute;
