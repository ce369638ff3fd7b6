import type { ComputeTiming } from '@shared/computeTiming';
import type { RunStatus } from '@shared/runs';

/** A time span for people: "under 1 s", "43 s", "1 min 20 s", "2 h 1 min". */
export function formatDuration(seconds: number): string {
  if (seconds < 1) return 'under 1 s';
  const whole = Math.round(seconds);
  if (whole < 60) return `${whole} s`;
  if (whole < 3600) return `${Math.floor(whole / 60)} min ${whole % 60} s`;
  const minutes = Math.round(whole / 60);
  return `${Math.floor(minutes / 60)} h ${minutes % 60} min`;
}

/** An estimate, as coarse as it is sure: to 5 s under a minute, to the minute under an hour, to 5 min above. */
export function formatEstimate(seconds: number): string {
  if (seconds < 60) return `${Math.max(5, Math.round(seconds / 5) * 5)} s`;
  if (seconds < 3600) return `${Math.max(1, Math.round(seconds / 60))} min`;
  const minutes = Math.round(seconds / 300) * 5;
  return minutes % 60 === 0 ? `${minutes / 60} h` : `${Math.floor(minutes / 60)} h ${minutes % 60} min`;
}

/** 1 → "next", 2 → "2nd", 3 → "3rd", 11 → "11th", 22 → "22nd". */
export function placeInLine(position: number): string {
  if (position === 1) return 'next';
  const tens = position % 100;
  const suffix = tens >= 11 && tens <= 13 ? 'th' : ({ 1: 'st', 2: 'nd', 3: 'rd' } as Record<number, string>)[position % 10] ?? 'th';
  return `${position}${suffix}`;
}

/**
 * One line of time and queue for a run or a study: "queued · 3rd in line", "running 1 min 20 s · about
 * 2 min left" (the time left is the server's estimate, so it says "about"), "took 4 s"; a running study
 * with cells still waiting adds where the next of them stands. Null when there is nothing to say.
 */
export function computeTimingText(status: RunStatus, timing: ComputeTiming): string | null {
  const parts: string[] = [];
  const elapsed = timing.elapsedSeconds;
  if (status === 'queued') {
    parts.push(timing.queuePosition !== null ? `queued · ${placeInLine(timing.queuePosition)} in line` : 'queued');
  } else if (status === 'running') {
    parts.push(elapsed !== null ? `running ${formatDuration(elapsed)}` : 'running');
    if (timing.estimatedSecondsLeft !== null) parts.push(`about ${formatEstimate(timing.estimatedSecondsLeft)} left`);
    if (timing.queuePosition !== null) parts.push(`next cell ${placeInLine(timing.queuePosition)} in line`);
  } else if (elapsed !== null) {
    parts.push(status === 'done' ? `took ${formatDuration(elapsed)}` : `${status} after ${formatDuration(elapsed)}`);
  }
  return parts.length ? parts.join(' · ') : null;
}
