import type { RestrictedCut, TruncationRule } from '@shared/vacuum';
import { parseNumber } from './forms';

/** The editable form of a truncation rule: its kind and the one number some kinds take, as typed. */
export interface TruncationFormValues {
  kind: TruncationRule['rule'];
  /** λ_c for "lambda", the mode count for "modes", the tolerance for "knee" (may be empty) */
  value: string;
}

export const truncationKinds: { kind: TruncationRule['rule']; label: string; valueLabel?: string; hint: string }[] = [
  { kind: 'sqrtN', label: '√N / 4π', hint: 'Cut at λc = √N/(4π), the usual rule for 2D diamonds.' },
  { kind: 'lambda', label: 'Fixed λ', valueLabel: 'λc', hint: 'Keep the modes with eigenvalue above λc (a number ≥ 0).' },
  { kind: 'modes', label: 'Top modes', valueLabel: 'modes kept', hint: 'Keep the K largest positive eigenvalues (a whole number ≥ 1).' },
  {
    kind: 'knee',
    label: 'Knee',
    valueLabel: 'tolerance',
    hint: 'Cut where the spectrum leaves the power law fitted to its top; tolerance is the allowed relative departure (empty: the engine default).',
  },
  { kind: 'none', label: 'No truncation', hint: 'Keep every positive mode.' },
];

/** Plain messages for the numbers of a truncation rule and of the restricted cut, replacing the schema's terse ones ("Too small: ..."). */
export const truncationFieldMessages: Record<string, string> = {
  'truncation.cut': 'λc is a number ≥ 0.',
  'truncation.count': 'The number of modes kept is a whole number ≥ 1.',
  'truncation.tolerance': 'The tolerance is a positive number, at most 10 (or leave it empty).',
  'restrictedCut.cut': 'The restricted cut λ is a number ≥ 0.',
};

export const defaultTruncation: TruncationFormValues = { kind: 'sqrtN', value: '' };

/**
 * The rule the fields describe, still unvalidated (the shared schema checks it, so a bad value gets the
 * schema's message at path `truncation.<field>`).
 */
export function truncationFromForm(values: TruncationFormValues): unknown {
  const value = parseNumber(values.value);
  switch (values.kind) {
    case 'none':
    case 'sqrtN':
      return { rule: values.kind };
    case 'lambda':
      return { rule: 'lambda', cut: value };
    case 'modes':
      return { rule: 'modes', count: value };
    case 'knee':
      return value === undefined ? { rule: 'knee' } : { rule: 'knee', tolerance: value };
  }
}

export function truncationToForm(rule: TruncationRule): TruncationFormValues {
  switch (rule.rule) {
    case 'none':
    case 'sqrtN':
      return { kind: rule.rule, value: '' };
    case 'lambda':
      return { kind: 'lambda', value: String(rule.cut) };
    case 'modes':
      return { kind: 'modes', value: String(rule.count) };
    case 'knee':
      return { kind: 'knee', value: rule.tolerance === undefined ? '' : String(rule.tolerance) };
  }
}

/** How a rule reads in tables: "√N/4π", "λc = 0.5", "top 40 modes", "knee (tol 0.2)". */
export function describeTruncation(rule: TruncationRule): string {
  switch (rule.rule) {
    case 'none':
      return 'no truncation';
    case 'sqrtN':
      return '√N/4π';
    case 'lambda':
      return `λc = ${rule.cut}`;
    case 'modes':
      return `top ${rule.count} modes`;
    case 'knee':
      return rule.tolerance === undefined ? 'knee' : `knee (tol ${rule.tolerance})`;
  }
}

/** The restricted cut's short text form ("sqrtN", "lambda:0.2"), read for people: "√n/4π", "λ = 0.2". */
export function describeRestrictedCutText(text: string): string {
  const [head, arg] = text.split(':');
  if (head === 'sqrtN') return '√n/4π';
  if (head === 'lambda') return `λ = ${arg}`;
  return text;
}

/** The short text form the API lists runs with ("sqrtN", "lambda:0.5", ...), read for people. */
export function describeTruncationText(text: string): string {
  const [head, arg] = text.split(':');
  switch (head) {
    case 'none':
      return 'no truncation';
    case 'sqrtN':
      return '√N/4π';
    case 'lambda':
      return `λc = ${arg}`;
    case 'modes':
      return `top ${arg} modes`;
    case 'knee':
      return arg === undefined ? 'knee' : `knee (tol ${arg})`;
    default:
      return text;
  }
}

/** The restricted cut of double truncation as typed: √n/(4π), or a fixed λ (its number as text). */
export interface RestrictedCutFormValues {
  kind: RestrictedCut['rule'];
  value: string;
}

export const defaultRestrictedCutForm: RestrictedCutFormValues = { kind: 'sqrtN', value: '' };

/**
 * The restricted cut to send: none without double truncation; √n/(4π) is the server's default, so only
 * a fixed λ is sent (unvalidated: the shared schema names a bad number at `restrictedCut.cut`).
 */
export function restrictedCutFromForm(doubleTruncation: boolean, values: RestrictedCutFormValues): unknown {
  if (!doubleTruncation || values.kind === 'sqrtN') return undefined;
  return { rule: 'lambda', cut: parseNumber(values.value) };
}

export function restrictedCutToForm(cut: RestrictedCut | null | undefined): RestrictedCutFormValues {
  return cut?.rule === 'lambda' ? { kind: 'lambda', value: String(cut.cut) } : { ...defaultRestrictedCutForm };
}
