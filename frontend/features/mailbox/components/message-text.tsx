import { Fragment } from 'react';
import { Link } from 'react-router-dom';

const urlPattern = /(https?:\/\/[^\s<>"']+[^\s<>"'.,;:!?)\]])/g;

/** Pages of this app that e-mails link to; followed inside the app whatever host the e-mail names. */
const appPaths = ['/invitation', '/reset-password', '/login'];

function inAppTarget(href: string): string | null {
  try {
    const url = new URL(href);
    if (url.origin === window.location.origin || appPaths.includes(url.pathname)) {
      return `${url.pathname}${url.search}${url.hash}`;
    }
  } catch {
    return null;
  }
  return null;
}

/** A plain-text e-mail with its links made clickable. */
export const MessageText = ({ text }: { text: string }) => {
  const parts = text.split(urlPattern);
  return (
    <pre className="font-sans text-sm leading-relaxed break-words whitespace-pre-wrap text-ink">
      {parts.map((part, index) => {
        if (index % 2 === 0) return <Fragment key={index}>{part}</Fragment>;
        const target = inAppTarget(part);
        return target ? (
          <Link key={index} to={target} className="break-all underline">
            {part}
          </Link>
        ) : (
          <a key={index} href={part} target="_blank" rel="noopener noreferrer" className="break-all underline">
            {part}
          </a>
        );
      })}
    </pre>
  );
};
