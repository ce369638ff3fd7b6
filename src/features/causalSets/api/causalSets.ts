import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { apiErrorSchema } from '@shared/api';
import { teamHeaderName } from '@shared/headers';
import { metadataToFormFields, type CausalSetDetail, type CausalSetListResponse, type CausalSetMetadata } from '@shared/causalSets';
import { api, ApiError, csrfHeaders } from '../../../lib/apiClient';
import { getCurrentTeamId } from '../../../lib/currentTeam';
import { queryKeys } from '../../../lib/queryKeys';
import { useCurrentTeamId } from '../../../lib/currentUser';
import { attachmentName } from '../../../lib/download';

const setPath = (id: string, rest = '') => `/api/causal-sets/${encodeURIComponent(id)}${rest}`;

function teamHeaders(): Record<string, string> {
  const teamId = getCurrentTeamId();
  return teamId ? { [teamHeaderName]: teamId } : {};
}

/** The team's imported causal sets and the limits an upload must keep. */
export function useCausalSets() {
  const teamId = useCurrentTeamId();
  return useQuery({
    queryKey: queryKeys.causalSets.all(teamId ?? 'none'),
    queryFn: () => api.get<CausalSetListResponse>('/api/causal-sets'),
    enabled: teamId !== null,
  });
}

export function useCausalSet(id: string) {
  const teamId = useCurrentTeamId();
  return useQuery({
    queryKey: queryKeys.causalSets.detail(teamId ?? 'none', id),
    queryFn: () => api.get<CausalSetDetail>(setPath(id)),
    enabled: teamId !== null,
  });
}

/**
 * Uploads as multipart/form-data (the JSON client cannot): the metadata as text fields, then the file.
 * Errors keep the server's shape, so row/column problems arrive as `issues`.
 */
export async function uploadCausalSet(metadata: CausalSetMetadata, file: File): Promise<{ id: string }> {
  const form = new FormData();
  for (const [key, value] of Object.entries(metadataToFormFields(metadata))) form.append(key, value);
  form.append('file', file, file.name);
  let response: Response;
  try {
    response = await fetch('/api/causal-sets', { method: 'POST', body: form, credentials: 'include', headers: { Accept: 'application/json', ...teamHeaders(), ...csrfHeaders() } });
  } catch {
    throw new ApiError(0, 'network', 'The server cannot be reached. Check your connection and try again.');
  }
  const payload: unknown = await response.json().catch(() => undefined);
  if (!response.ok) {
    const parsed = apiErrorSchema.safeParse(payload);
    if (parsed.success) throw new ApiError(response.status, parsed.data.error.code, parsed.data.error.message, parsed.data.error.issues ?? []);
    throw new ApiError(response.status, `http_${response.status}`, `The server answered ${response.status} ${response.statusText}.`);
  }
  return payload as { id: string };
}

export function useUploadCausalSet() {
  const queryClient = useQueryClient();
  const teamId = useCurrentTeamId() ?? 'none';
  return useMutation({
    mutationFn: ({ metadata, file }: { metadata: CausalSetMetadata; file: File }) => uploadCausalSet(metadata, file),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.causalSets.all(teamId) }),
  });
}

export function useDeleteCausalSet() {
  const queryClient = useQueryClient();
  const teamId = useCurrentTeamId() ?? 'none';
  return useMutation({
    mutationFn: (id: string) => api.delete(setPath(id)),
    onSuccess: (_nothing, id) => {
      queryClient.removeQueries({ queryKey: queryKeys.causalSets.detail(teamId, id) });
      return queryClient.invalidateQueries({ queryKey: queryKeys.causalSets.all(teamId) });
    },
  });
}

/** Downloads the file exactly as it was uploaded (fetched so the team header goes with it). */
export async function downloadOriginalFile(id: string, fallbackName: string): Promise<void> {
  const response = await fetch(setPath(id, '/file'), { credentials: 'include', headers: teamHeaders() });
  if (!response.ok) {
    const parsed = apiErrorSchema.safeParse(await response.json().catch(() => undefined));
    throw new ApiError(response.status, 'download_failed', parsed.success ? parsed.data.error.message : `The download failed (${response.status}).`);
  }
  const url = URL.createObjectURL(await response.blob());
  const link = document.createElement('a');
  link.href = url;
  link.download = attachmentName(response.headers.get('content-disposition'), fallbackName);
  document.body.append(link);
  link.click();
  link.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}
