const dateTime = new Intl.DateTimeFormat(undefined, {
  year: 'numeric',
  month: 'short',
  day: '2-digit',
  hour: '2-digit',
  minute: '2-digit',
});
const dateOnly = new Intl.DateTimeFormat(undefined, { year: 'numeric', month: 'short', day: '2-digit' });

export function formatDateTime(iso: string): string {
  const date = new Date(iso);
  return Number.isNaN(date.getTime()) ? iso : dateTime.format(date);
}

export function formatDate(iso: string): string {
  const date = new Date(iso);
  return Number.isNaN(date.getTime()) ? iso : dateOnly.format(date);
}

export const roleLabels = { owner: 'Owner', researcher: 'Researcher', viewer: 'Viewer' } as const;

export const roleDescriptions = {
  owner: 'members, invitations and team settings, plus everything a researcher can do',
  researcher: 'creates and runs computations, imports causal sets, saves cut rules',
  viewer: 'reads and exports',
} as const;
