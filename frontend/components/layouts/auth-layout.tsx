import type { ReactNode } from 'react';
import { Brand } from '@/components/brand';
import { useDocumentTitle } from '@/hooks/use-document-title';

export interface AuthLayoutProps {
  title: string;
  intro?: ReactNode;
  children: ReactNode;
  footer?: ReactNode;
}

/** The signed-out pages: one calm card on the ground. */
export const AuthLayout = ({ title, intro, children, footer }: AuthLayoutProps) => {
  useDocumentTitle(title);
  return (
    <div className="flex min-h-dvh flex-col items-center px-4 py-10 sm:justify-center sm:py-16">
      <div className="w-full max-w-sm">
        <div className="mb-8 flex justify-center">
          <Brand />
        </div>
        <main className="rounded-lg border border-line bg-surface p-6 shadow-sm">
          <h1 className="text-xl">{title}</h1>
          {intro ? <div className="mt-1.5 text-sm text-ink-muted">{intro}</div> : null}
          <div className="mt-5">{children}</div>
        </main>
        {footer ? <div className="mt-5 text-center text-sm text-ink-muted">{footer}</div> : null}
      </div>
    </div>
  );
};
