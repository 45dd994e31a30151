import { useEffect } from 'react';
import { productName } from '@/config/app';

/** "Members · Cellarwright" in the tab and the history list. */
export function useDocumentTitle(title?: string): void {
  useEffect(() => {
    document.title = title ? `${title} · ${productName}` : productName;
  }, [title]);
}
