import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { metadataToFormFields, type CausalSetDetail, type CausalSetListResponse, type CausalSetMetadata } from '@shared/causalSets';
import { api } from '../../../lib/apiClient';
import { queryKeys } from '../../../lib/queryKeys';
import { useCurrentTeamId } from '../../../lib/currentUser';

const setPath = (id: string, rest = '') => `/api/causal-sets/${encodeURIComponent(id)}${rest}`;

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

/** Uploads the metadata as text fields, then the file; a bad row or column comes back as an issue. */
export function uploadCausalSet(metadata: CausalSetMetadata, file: File): Promise<{ id: string }> {
  const form = new FormData();
  for (const [key, value] of Object.entries(metadataToFormFields(metadata))) form.append(key, value);
  form.append('file', file, file.name);
  return api.upload<{ id: string }>('/api/causal-sets', form);
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

/** Downloads the file exactly as it was uploaded. */
export function downloadOriginalFile(id: string, fallbackName: string): Promise<void> {
  return api.download(setPath(id, '/file'), fallbackName);
}
