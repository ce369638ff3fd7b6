import { Fragment } from 'react';

const urlPattern = /(https?:\/\/[^\s<>"')]+)/g;

/**
 * Plain-text mail with its links made clickable. A link to this app opens in the same tab,
 * so following an invitation or reset link works as it would from a mail program.
 */
export function MessageText({ text }: { text: string }) {
  const parts = text.split(urlPattern);
  return (
    <pre className="font-mono text-[0.8125rem] leading-relaxed whitespace-pre-wrap break-words text-ink">
      {parts.map((part, index) =>
        index % 2 === 1 ? (
          <a key={index} href={part} className="text-accent underline underline-offset-2 hover:text-accent-deep">
            {part}
          </a>
        ) : (
          <Fragment key={index}>{part}</Fragment>
        ),
      )}
    </pre>
  );
}
