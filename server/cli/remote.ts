import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { apiTokenPrefix } from '@shared/apiTokens';
import { exportFileName, exportTables, exportUrl, type ExportKind } from '@shared/exports';
import { createRunRequestSchema } from '@shared/runs';
import { createStudyRequestSchema } from '@shared/studies';

/**
 * `tacet submit` and `tacet fetch`: the command line as a client of a Tacet service, so a notebook or a
 * script can queue work and download results. The service is TACET_URL (e.g. http://127.0.0.1:4310) and
 * the caller a personal API token (Account page, tct_…) in TACET_TOKEN; a token acts in its own team.
 */

/** A problem the caller can fix (URL, token, spec): one line on stderr, exit code 2. */
export class RemoteUsageError extends Error {
  override readonly name = 'RemoteUsageError';
}

export interface RemoteIo {
  stdout(text: string): void;
  stderr(text: string): void;
  env: Record<string, string | undefined>;
}

interface Service {
  url: string;
  token: string;
}

function service(env: RemoteIo['env']): Service {
  const url = env.TACET_URL?.trim();
  const token = env.TACET_TOKEN?.trim();
  if (!url) throw new RemoteUsageError('set TACET_URL to the Tacet service, e.g. TACET_URL=http://127.0.0.1:4310');
  if (!/^https?:\/\/[^/\s]+/.test(url)) throw new RemoteUsageError(`TACET_URL must be an http(s) address such as http://127.0.0.1:4310, got "${url}"`);
  if (!token) throw new RemoteUsageError('set TACET_TOKEN to a personal API token (Account page → API tokens; it starts with tct_)');
  if (!token.startsWith(apiTokenPrefix)) throw new RemoteUsageError(`TACET_TOKEN must be a personal API token starting with ${apiTokenPrefix} (made on the Account page)`);
  return { url: url.replace(/\/+$/, ''), token };
}

/** The API's error answer as one line: its message and, for a refused body, each field with its path. */
function refusal(status: number, body: unknown): string {
  const error = (body as { error?: { message?: string; issues?: { path?: (string | number)[] | string; message?: string }[] } } | null)?.error;
  const issues = (error?.issues ?? []).map((i) => `${Array.isArray(i.path) ? i.path.join('.') : (i.path ?? '')}: ${i.message ?? ''}`.replace(/^: /, ''));
  return `${error?.message ?? `HTTP ${status}`}${issues.length ? ` (${issues.join('; ')})` : ''}`;
}

async function call(s: Service, method: 'GET' | 'POST', path: string, body?: unknown): Promise<{ status: number; json: unknown; text: string }> {
  let response: Response;
  try {
    response = await fetch(`${s.url}${path}`, {
      method,
      headers: { Authorization: `Bearer ${s.token}`, ...(body !== undefined ? { 'Content-Type': 'application/json' } : {}) },
      body: body !== undefined ? JSON.stringify(body) : undefined,
    });
  } catch (error) {
    const cause = (error as { cause?: { code?: string; message?: string } }).cause;
    throw new RemoteUsageError(`cannot reach Tacet at ${s.url} (${cause?.code ?? cause?.message ?? (error as Error).message}); check TACET_URL and that the service runs`);
  }
  const text = await response.text();
  let json: unknown = null;
  try {
    json = text ? JSON.parse(text) : null;
  } catch {
    json = null;
  }
  if (response.status === 401) {
    throw new RemoteUsageError(`the service refused TACET_TOKEN (${refusal(401, json)}): it may have expired or been revoked; make a new one on the Account page`);
  }
  if (response.status === 403) throw new RemoteUsageError(`not allowed: ${refusal(403, json)} (viewers may read but not submit)`);
  if (json === null && response.headers.get('content-type')?.includes('json') !== false && response.status >= 400) {
    throw new RemoteUsageError(`${s.url} answered HTTP ${response.status} without a Tacet error; is TACET_URL the Tacet service?`);
  }
  return { status: response.status, json, text };
}

/** Whether a spec is a study (the study request's fields) or a run; the schemas are the API's own. */
function specKind(spec: unknown): 'run' | 'study' {
  if (spec && typeof spec === 'object' && !Array.isArray(spec)) {
    const keys = Object.keys(spec);
    if (['counts', 'seeds', 'rules', 'subregions', 'causalSetIds', 'source'].some((k) => keys.includes(k))) return 'study';
  }
  return 'run';
}

/**
 * `tacet submit SPEC.json`: the JSON body of POST /api/runs or POST /api/studies, checked here with the
 * API's schemas (a refused field is named before anything is sent), then queued. Prints
 * `{ kind, id, url }` as JSON.
 */
export async function submit(args: string[], io: RemoteIo): Promise<void> {
  const [file, ...extra] = args;
  if (!file || extra.length > 0 || file.startsWith('--')) throw new RemoteUsageError('usage: tacet submit SPEC.json (the JSON body of a run or a study, as the API takes it)');
  let spec: unknown;
  try {
    spec = JSON.parse(readFileSync(file, 'utf8'));
  } catch (error) {
    throw new RemoteUsageError(`cannot read ${file} as JSON: ${(error as NodeJS.ErrnoException).code ?? (error as Error).message}`);
  }
  const kind = specKind(spec);
  const parsed = (kind === 'study' ? createStudyRequestSchema : createRunRequestSchema).safeParse(spec);
  if (!parsed.success) {
    const issues = parsed.error.issues.map((i) => `${i.path.join('.') || '(the spec)'}: ${i.message}`);
    throw new RemoteUsageError(`${file} is not a valid ${kind} spec: ${issues.join('; ')}`);
  }
  const s = service(io.env);
  const answer = await call(s, 'POST', kind === 'study' ? '/api/studies' : '/api/runs', spec);
  if (answer.status !== 202) throw new RemoteUsageError(`the service refused the ${kind}: ${refusal(answer.status, answer.json)}`);
  const id = (answer.json as { id: string }).id;
  io.stdout(JSON.stringify({ kind, id, url: `${s.url}/${kind === 'study' ? 'studies' : 'runs'}/${id}` }) + '\n');
}

const terminal = new Set(['done', 'failed', 'cancelled']);

/**
 * `tacet fetch ID [--out DIR] [--wait]`: a run's or a study's detail as JSON on stdout; with --wait it
 * polls until the work has ended (progress on stderr); with --out it also writes the detail and every
 * export of a done run or study into DIR, named as the app names its downloads.
 */
export async function fetchWork(args: string[], io: RemoteIo): Promise<void> {
  let id: string | undefined;
  let out: string | undefined;
  let wait = false;
  for (let k = 0; k < args.length; k++) {
    const a = args[k]!;
    if (a === '--out') out = args[++k];
    else if (a.startsWith('--out=')) out = a.slice(6);
    else if (a === '--wait') wait = true;
    else if (!a.startsWith('--') && id === undefined) id = a;
    else throw new RemoteUsageError(`unknown argument "${a}"; usage: tacet fetch ID [--out DIR] [--wait]`);
  }
  if (!id) throw new RemoteUsageError('usage: tacet fetch ID [--out DIR] [--wait]');
  if (out === undefined && args.includes('--out')) throw new RemoteUsageError('--out needs a folder');
  const s = service(io.env);
  let kind: ExportKind = 'run';
  let detail = await call(s, 'GET', `/api/runs/${encodeURIComponent(id)}`);
  if (detail.status === 404 || detail.status === 400) {
    kind = 'study';
    detail = await call(s, 'GET', `/api/studies/${encodeURIComponent(id)}`);
  }
  if (detail.status === 404 || detail.status === 400) throw new RemoteUsageError(`no run or study ${id} in the token's team`);
  if (detail.status !== 200) throw new RemoteUsageError(`the service answered: ${refusal(detail.status, detail.json)}`);
  let body = detail.json as { status: string; percent?: number; progress?: { percent: number } };
  while (wait && !terminal.has(body.status)) {
    io.stderr(`${kind} ${id}: ${body.status} ${Math.round(body.percent ?? body.progress?.percent ?? 0)} %\n`);
    await new Promise((resolve) => setTimeout(resolve, 1000));
    const again = await call(s, 'GET', `/api/${kind === 'study' ? 'studies' : 'runs'}/${encodeURIComponent(id)}`);
    if (again.status !== 200) throw new RemoteUsageError(`the service answered: ${refusal(again.status, again.json)}`);
    body = again.json as typeof body;
  }
  if (out !== undefined) {
    mkdirSync(out, { recursive: true });
    writeFileSync(join(out, `${kind}-${id}.json`), JSON.stringify(body, null, 2) + '\n');
    const written: string[] = [`${kind}-${id}.json`];
    if (body.status === 'done' || (kind === 'study' && (body.progress as { done?: number } | undefined)?.done)) {
      const formats = exportTables[kind].formats as readonly string[];
      for (const format of formats) {
        const file = await call(s, 'GET', exportUrl(kind, id, format as never));
        if (file.status !== 200) throw new RemoteUsageError(`the ${format} export was refused: ${refusal(file.status, file.json)}`);
        const name = exportFileName(kind, id, format as never);
        writeFileSync(join(out, name), file.text);
        written.push(name);
      }
    }
    io.stderr(`wrote ${written.length} file(s) to ${out}: ${written.join(', ')}\n`);
  }
  io.stdout(JSON.stringify(body) + '\n');
}
