import { teamHeaderName } from '@shared/headers';
import { ApiError } from './apiClient';
import { getCurrentTeamId } from './currentTeam';

/** The file name a response asks to be saved as (Content-Disposition), or the fallback. */
export function attachmentName(disposition: string | null, fallback: string): string {
  if (!disposition) return fallback;
  const star = /filename\*=UTF-8''([^;]+)/i.exec(disposition);
  if (star) return decodeURIComponent(star[1].trim());
  const plain = /filename="?([^";]+)"?/i.exec(disposition);
  return plain ? plain[1].trim() : fallback;
}

/**
 * Downloads a file of the API. Fetched (not a bare link) so the current team's header goes with it,
 * then handed to the browser as a file with the name the server gives (else `fallbackName`).
 */
export async function downloadFile(path: string, fallbackName: string): Promise<void> {
  const headers: Record<string, string> = {};
  const teamId = getCurrentTeamId();
  if (teamId) headers[teamHeaderName] = teamId;
  const response = await fetch(path, { credentials: 'include', headers });
  if (!response.ok) {
    let message = `The download failed (${response.status} ${response.statusText}).`;
    try {
      const payload = (await response.json()) as { error?: { message?: string } };
      if (payload.error?.message) message = payload.error.message;
    } catch {
      // not JSON: keep the status line
    }
    throw new ApiError(response.status, 'download_failed', message);
  }
  const blob = await response.blob();
  const url = URL.createObjectURL(blob);
  const link = document.createElement('a');
  link.href = url;
  link.download = attachmentName(response.headers.get('content-disposition'), fallbackName);
  document.body.append(link);
  link.click();
  link.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}
