import ReactMarkdown, { type Components } from 'react-markdown';

/** Our look for the few Markdown elements server-written texts use (code, emphasis, links, lists). */
const components: Components = {
  p: ({ children }) => <p className="mb-2 last:mb-0">{children}</p>,
  code: ({ children }) => <code className="figures rounded-sm bg-paper-deep px-1 text-[0.95em] text-ink">{children}</code>,
  a: ({ href, children }) => (
    <a className="text-accent underline underline-offset-4" href={href}>
      {children}
    </a>
  ),
  ul: ({ children }) => <ul className="mb-2 ml-5 list-disc">{children}</ul>,
  ol: ({ children }) => <ol className="mb-2 ml-5 list-decimal">{children}</ol>,
};

/**
 * Markdown from our own server (the API description's texts) as React elements: no raw HTML is
 * passed through, so a stray tag shows as text rather than running.
 */
export function Markdown({ text, className = '' }: { text: string; className?: string }) {
  return (
    <div className={className}>
      <ReactMarkdown components={components} skipHtml>
        {text}
      </ReactMarkdown>
    </div>
  );
}
