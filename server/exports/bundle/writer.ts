import { createHash } from 'node:crypto';
import type { Writable } from 'node:stream';
import { ZipArchive } from 'archiver';
import { bundleManifestSchema, type BundleManifest } from '@shared/bundles';

/**
 * A zip written entry by entry into `output` (the HTTP response): each entry is handed to archiver
 * only after the previous one has gone through it, so at most one file is held at a time, and the
 * SHA-256 of each is taken as it is added. manifest.json, which lists them all, is the last entry.
 */
export class BundleWriter {
  private readonly archive = new ZipArchive({ zlib: { level: 6 } });
  private readonly hashes: Record<string, string> = {};
  private failure: Error | null = null;
  private readonly failed: Promise<never>;

  constructor(output: Writable) {
    this.failed = new Promise<never>((_resolve, reject) => {
      const fail = (error: Error) => {
        this.failure ??= error;
        reject(this.failure);
      };
      this.archive.on('error', fail);
      this.archive.on('warning', fail);
      output.on('error', fail);
      // a client that goes away closes the response early; stop writing instead of filling memory
      output.on('close', () => {
        if (!output.writableFinished) fail(new Error('the download was closed before the bundle was complete'));
      });
    });
    this.failed.catch(() => undefined);
    this.archive.pipe(output);
  }

  /** Paths written so far, in order. */
  get paths(): string[] {
    return Object.keys(this.hashes);
  }

  /** Adds one file; resolves once archiver has taken it in (it waits while the client reads slowly). */
  async add(path: string, content: string | Buffer): Promise<void> {
    if (this.failure) throw this.failure;
    if (path in this.hashes || path === 'manifest.json') throw new Error(`the bundle already has a file ${path}`);
    const bytes = typeof content === 'string' ? Buffer.from(content, 'utf8') : content;
    this.hashes[path] = createHash('sha256').update(bytes).digest('hex');
    const taken = new Promise<void>((resolve) => this.archive.once('entry', () => resolve()));
    this.archive.append(bytes, { name: path });
    await Promise.race([taken, this.failed]);
  }

  /** Writes manifest.json with every file's hash and closes the zip. */
  async finish(manifest: Omit<BundleManifest, 'files'>): Promise<BundleManifest> {
    const complete = bundleManifestSchema.parse({ ...manifest, files: { ...this.hashes } });
    const taken = new Promise<void>((resolve) => this.archive.once('entry', () => resolve()));
    this.archive.append(JSON.stringify(complete, null, 2) + '\n', { name: 'manifest.json' });
    await Promise.race([taken, this.failed]);
    await Promise.race([this.archive.finalize(), this.failed]);
    return complete;
  }

  /** Stops the zip where it is (after a failure); the client sees a truncated download, not a complete-looking file. */
  abort(): void {
    this.archive.abort();
  }
}
