import { useEffect, useRef, useState, type HTMLAttributes, type ReactNode } from 'react';
import { cn } from '@/utils/cn';

/** Whether an element's content is wider or taller than the element (it scrolls). */
export function useOverflowing<T extends HTMLElement>(): [React.RefObject<T | null>, boolean] {
  const ref = useRef<T>(null);
  const [overflowing, setOverflowing] = useState(false);
  useEffect(() => {
    const el = ref.current;
    if (!el) return;
    const measure = () => setOverflowing(el.scrollWidth > el.clientWidth + 1 || el.scrollHeight > el.clientHeight + 1);
    measure();
    const resized = new ResizeObserver(measure);
    resized.observe(el);
    for (const child of Array.from(el.children)) resized.observe(child);
    const changed = new MutationObserver(measure);
    changed.observe(el, { childList: true, subtree: true });
    return () => {
      resized.disconnect();
      changed.disconnect();
    };
  }, []);
  return [ref, overflowing];
}

export interface ScrollRegionProps extends HTMLAttributes<HTMLDivElement> {
  /** Names the region for screen readers ("Invoices", "Monthly report"). */
  label: string;
  children: ReactNode;
}

/**
 * A box that scrolls (a wide table on a phone, a long list). While its content overflows it is a named
 * region that takes keyboard focus, so the arrow keys scroll it without a mouse; otherwise it is a plain box.
 */
export const ScrollRegion = ({ label, className, children, ...rest }: ScrollRegionProps) => {
  const [ref, overflowing] = useOverflowing<HTMLDivElement>();
  return (
    <div
      ref={ref}
      {...rest}
      className={cn('focus-visible:outline-2 focus-visible:outline-offset-2 focus-visible:outline-copper-strong', className)}
      {...(overflowing ? { role: 'region', 'aria-label': label, tabIndex: 0 } : {})}
    >
      {children}
    </div>
  );
};
