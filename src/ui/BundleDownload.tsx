import { useState } from 'react';
import { teamHeaderName } from '@shared/headers';
import { csrfHeaders } from '../lib/apiClient';
import { getCurrentTeamId } from '../lib/currentTeam';
import { attachmentName, saveBlob } from '../lib/download';
import { Button } from './Button';

/** The header of POST/GET bundle answers with the number of files the zip will hold (shared/bundles.ts, kept here without zod). */
const fileCountHeader = 'x-tacet-bundle-files';
/** Each file of a zip starts with this local-header signature; counting them as bytes arrive tells how many files have come. */
const localHeader = [0x50, 0x4b, 0x03, 0x04];

export type BundleTarget = { kind: 'study'; id: string } | { kind: 'runs'; ids: string[] };

interface Progress {
  files: number;
  expected: number | null;
  bytes: number;
}

const amountOf = (bytes: number) => (bytes < 1e6 ? `${Math.ceil(bytes / 1e3)} kB` : `${(bytes / 1e6).toFixed(bytes < 1e7 ? 1 : 0)} MB`);

/** Counts local headers in a chunk; `tail` carries the last three bytes of the previous one, so a signature split between chunks counts once. */
function countHeaders(chunk: Uint8Array, tail: number[]): { count: number; tail: number[] } {
  const bytes = tail.length ? Uint8Array.from([...tail, ...chunk]) : chunk;
  let count = 0;
  for (let i = 0; i + 3 < bytes.length; i++) {
    if (bytes[i] === localHeader[0] && bytes[i + 1] === localHeader[1] && bytes[i + 2] === localHeader[2] && bytes[i + 3] === localHeader[3]) count++;
  }
  return { count, tail: Array.from(bytes.subarray(Math.max(0, bytes.length - 3))) };
}

async function errorMessage(response: Response): Promise<string> {
  try {
    const body = (await response.json()) as { error?: { message?: string } };
    if (body.error?.message) return body.error.message;
  } catch {
    // not JSON: the status line says enough
  }
  return `The bundle could not be made (${response.status} ${response.statusText}).`;
}

/**
 * Downloads a supplementary bundle, showing files and bytes as the server streams it (a large study's
 * bundle takes a while: its points are drawn again cell by cell).
 */
async function fetchBundle(target: BundleTarget, onProgress: (p: Progress) => void): Promise<void> {
  const headers: Record<string, string> = {};
  const teamId = getCurrentTeamId();
  if (teamId) headers[teamHeaderName] = teamId;
  const init: RequestInit =
    target.kind === 'study'
      ? { method: 'GET', headers }
      : { method: 'POST', headers: { ...headers, ...csrfHeaders(), 'Content-Type': 'application/json' }, body: JSON.stringify({ runIds: target.ids }) };
  const url = target.kind === 'study' ? `/api/studies/${encodeURIComponent(target.id)}/bundle` : '/api/bundles';
  let response: Response;
  try {
    response = await fetch(url, { ...init, credentials: 'include' });
  } catch {
    throw new Error('The server cannot be reached. Check your connection and try again.');
  }
  if (!response.ok || !response.body) throw new Error(await errorMessage(response));
  const expectedText = response.headers.get(fileCountHeader);
  const progress: Progress = { files: 0, expected: expectedText ? Number(expectedText) : null, bytes: 0 };
  onProgress({ ...progress });
  const chunks: Uint8Array[] = [];
  const reader = response.body.getReader();
  let tail: number[] = [];
  for (;;) {
    let step: ReadableStreamReadResult<Uint8Array>;
    try {
      step = await reader.read();
    } catch {
      throw new Error('The download broke off before the bundle was complete; nothing was saved. Try again.');
    }
    if (step.done) break;
    chunks.push(step.value);
    const counted = countHeaders(step.value, tail);
    tail = counted.tail;
    progress.files += counted.count;
    progress.bytes += step.value.byteLength;
    onProgress({ ...progress });
  }
  const fallback = target.kind === 'study' ? `tacet-study-${target.id.slice(0, 8)}-bundle.zip` : `tacet-runs-${target.ids.length}-bundle.zip`;
  saveBlob(new Blob(chunks as BlobPart[], { type: 'application/zip' }), attachmentName(response.headers.get('content-disposition'), fallback));
}

/** The "Supplementary bundle" button of a study or of the runs ticked in a list, with its progress line. */
export function BundleDownload({ target, disabled = false, disabledReason, testId = 'bundle-download' }: { target: BundleTarget; disabled?: boolean; disabledReason?: string; testId?: string }) {
  const [progress, setProgress] = useState<Progress | null>(null);
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const [saved, setSaved] = useState(false);

  async function download() {
    setError(null);
    setSaved(false);
    setBusy(true);
    setProgress(null);
    try {
      await fetchBundle(target, setProgress);
      setSaved(true);
    } catch (cause) {
      setError(cause instanceof Error ? cause.message : String(cause));
    } finally {
      setBusy(false);
    }
  }

  return (
    <div className="mt-3 flex flex-col gap-1" data-testid={testId}>
      <div className="flex flex-wrap items-baseline gap-x-4 gap-y-1">
        <Button variant="quiet" busy={busy} disabled={disabled} title={disabled ? disabledReason : undefined} onClick={download}>
          Supplementary bundle (zip)
        </Button>
        <span className="text-xs text-ink-faint">
          points, spectra, tables, figures (SVG, PDF), methods, BibTeX and a manifest that <span className="font-mono">tacet reproduce</span> checks
        </span>
      </div>
      {progress && (busy || saved) && (
        <p className="figures text-xs text-ink-soft" role="status" data-testid={`${testId}-progress`}>
          {saved ? 'Saved: ' : 'Receiving: '}
          {progress.files}
          {progress.expected !== null ? ` of ${progress.expected}` : ''} files, {amountOf(progress.bytes)}
        </p>
      )}
      {error && (
        <p role="alert" className="text-xs text-danger">
          {error}
        </p>
      )}
    </div>
  );
}
