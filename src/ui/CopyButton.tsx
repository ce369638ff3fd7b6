import { useEffect, useRef, useState } from 'react';
import { Button } from './Button';

/**
 * Copies a text to the clipboard and says "Copied". Where the Clipboard API is missing or refused
 * (a page served over plain HTTP to another host, a browser that asks first), the text appears in a
 * selected box instead, so ⌘C / Ctrl+C copies it and nothing is lost.
 */
export function CopyButton({ text, label, testId }: { text: () => string; label: string; testId?: string }) {
  const [state, setState] = useState<'idle' | 'copied' | 'manual'>('idle');
  const [error, setError] = useState<string | null>(null);
  const [fallbackText, setFallbackText] = useState('');
  const box = useRef<HTMLTextAreaElement>(null);

  useEffect(() => {
    if (state === 'manual') box.current?.select();
    if (state !== 'copied') return;
    const timer = setTimeout(() => setState('idle'), 2500);
    return () => clearTimeout(timer);
  }, [state]);

  async function copy() {
    setError(null);
    let content: string;
    try {
      content = text();
    } catch (cause) {
      setError(cause instanceof Error ? cause.message : String(cause));
      return;
    }
    try {
      if (!navigator.clipboard?.writeText) throw new Error('no clipboard');
      await navigator.clipboard.writeText(content);
      setState('copied');
    } catch {
      setFallbackText(content);
      setState('manual');
    }
  }

  return (
    <div className="flex flex-col gap-2" data-testid={testId}>
      <div className="flex items-baseline gap-3">
        <Button variant="quiet" onClick={copy}>
          {label}
        </Button>
        <span role="status" className="text-xs text-ink-soft">
          {state === 'copied' ? 'Copied' : state === 'manual' ? 'The clipboard is not available here: the text below is selected, copy it with Ctrl+C (⌘C).' : ''}
        </span>
      </div>
      {state === 'manual' && (
        <textarea
          ref={box}
          readOnly
          value={fallbackText}
          aria-label={`${label}: text to copy`}
          rows={Math.min(16, fallbackText.split('\n').length)}
          className="figures w-full resize-y border border-rule bg-paper p-2 text-xs text-ink"
          onFocus={(event) => event.currentTarget.select()}
        />
      )}
      {error && (
        <p role="alert" className="text-xs text-danger">
          {error}
        </p>
      )}
    </div>
  );
}
