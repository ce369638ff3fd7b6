import { readFileSync, writeFileSync } from 'node:fs';
import { pathToFileURL } from 'node:url';
import { parseArgs, type ParseArgsConfig } from 'node:util';
import {
  entropyRuleLabel,
  formatRestrictedCut,
  formatTruncationRule,
  parseRenyiOrders,
  parseRestrictedCut,
  parseSubregion,
  parseTruncationRule,
  regionSpecSchema,
  renyiLabel,
  sortedRenyiOrders,
  renyiKey,
  type RegionSpec,
  type SubregionSpec,
} from '@shared/vacuum';
import { findRegionDescriptor, regionDescriptors, regionKinds } from '@shared/regions';
import { regionCommentLine } from '@shared/regionProposal';
import { commandHelp, commandNames, OVERVIEW_HELP, type CommandName } from './help';
import { computeVacuum, EngineInputError, engineRequests, type EngineRequest, type EntropyResult, type VacuumRequest, type VacuumResult } from '../engine/index';
import { sprinkle } from '../engine/sprinkle';
import { manifoldLikeness, RELATION_INSPECT_LIMIT, type ManifoldLikeness } from '../engine/manifoldLikeness';
import { makeRegion } from '../engine/regions';
import { CausalSetFileError, parseRelationList } from '../causalSets/parse';
import { formatDimension, longestChainConstant } from '@shared/manifoldLikeness';
import { fetchWork, RemoteUsageError, submit } from './remote';
import { BundleRefusedError, reproduceBundle } from './reproduce';
import { ZodError } from 'zod';
import { belowEntropyFloor, formatCheckPair, formatEntropy, formatQuantity, formatSignificantDigits } from '@shared/precision';

/** Bad command-line input: reported as one line on stderr with exit code 2. */
export class UsageError extends Error {
  override readonly name = 'UsageError';
}

/** Every region kind's size options, in registry order without repeats. */
const regionSizeOptions = [...new Set(regionKinds.flatMap((kind) => regionDescriptors[kind].cli.options))];

const regionOptions = {
  region: { type: 'string' },
  ...(Object.fromEntries(regionSizeOptions.map((option) => [option, { type: 'string' }])) as Record<string, { type: 'string' }>),
} as const satisfies ParseArgsConfig['options'];

const computeOptions = {
  ...regionOptions,
  points: { type: 'string' },
  mass: { type: 'string' },
  density: { type: 'string' },
  truncation: { type: 'string' },
  backend: { type: 'string' },
  engine: { type: 'string' },
  json: { type: 'boolean' },
  help: { type: 'boolean', short: 'h' },
} as const satisfies ParseArgsConfig['options'];

function number(value: string, what: string): number {
  const v = value.trim() === '' ? Number.NaN : Number(value);
  if (!Number.isFinite(v)) throw new UsageError(`${what} must be a number, got "${value}"`);
  return v;
}

function pair(value: string, what: string): [number, number] {
  const parts = value.split(',');
  if (parts.length !== 2) throw new UsageError(`${what} must be two numbers A,B, got "${value}"`);
  return [number(parts[0], what), number(parts[1], what)];
}

/** The region spec from --region and its size options; null when --region is absent. */
function regionFromOptions(values: Record<string, string | boolean | undefined>): RegionSpec | null {
  const kind = values.region as string | undefined;
  if (kind === undefined) {
    for (const option of regionSizeOptions) {
      if (values[option] !== undefined) throw new UsageError(`--${option} needs --region`);
    }
    return null;
  }
  const descriptor = findRegionDescriptor(kind);
  if (!descriptor) throw new UsageError(`--region must be one of ${regionKinds.join(', ')}, got "${kind}"`);
  for (const option of regionSizeOptions) {
    if (values[option] !== undefined && !descriptor.cli.options.includes(option)) {
      throw new UsageError(`--${option} does not apply to --region ${kind}`);
    }
  }
  const candidate = descriptor.cli.fromOptions({
    option: (name) => values[name] as string | undefined,
    number,
    pair,
    fail: (message) => {
      throw new UsageError(message);
    },
  });
  const parsed = regionSpecSchema.safeParse(candidate);
  if (!parsed.success) throw new UsageError(`invalid ${kind} region: ${parsed.error.issues.map((i) => i.message).join('; ')}`);
  return parsed.data;
}

/** Points CSV with header t,x or t,x,y,z (the dimensions a field is computed in); every field a finite number. */
export function readPointsCsv(path: string): { points: Float64Array; dimension: 2 | 4 } {
  const { points, dimension, header } = readPointsOfAnyDimension(path);
  if (header !== 't,x' && header !== 't,x,y,z') throw new UsageError(`${path}: header must be t,x (2D) or t,x,y,z (4D), got "${header}"`);
  return { points, dimension: dimension as 2 | 4 };
}

/** The sprinkled points as CSV, the region they fill recorded in a first `#` line so an import can propose it. */
function pointsCsv(points: Float64Array, dimension: 2 | 4, region: RegionSpec): string {
  const header = dimension === 2 ? 't,x' : 't,x,y,z';
  const rows: string[] = [regionCommentLine(region), header];
  // String(v) is the shortest text that parses back to the same double, so the file round-trips exactly
  for (let i = 0; i < points.length / dimension; i++) rows.push(Array.from(points.subarray(i * dimension, (i + 1) * dimension), String).join(','));
  return rows.join('\n') + '\n';
}

function parse<T extends NonNullable<ParseArgsConfig['options']>>(args: string[], options: T) {
  try {
    return parseArgs({ args, options, strict: true, allowPositionals: false }).values as Record<string, string | boolean | undefined>;
  } catch (error) {
    throw new UsageError((error as Error).message.replace(/\s*\n\s*/g, ' '));
  }
}

interface Io {
  stdout: (text: string) => void;
  stderr: (text: string) => void;
  progress: boolean;
}

function runSprinkle(args: string[], io: Io): void {
  const values = parse(args, {
    ...regionOptions,
    n: { type: 'string' },
    density: { type: 'string' },
    poisson: { type: 'boolean' },
    seed: { type: 'string' },
    prng: { type: 'string' },
    out: { type: 'string' },
    help: { type: 'boolean', short: 'h' },
  });
  if (values.help) return io.stdout(commandHelp('sprinkle'));
  const region = regionFromOptions(values);
  if (!region) throw new UsageError('sprinkle needs --region');
  if (values.seed === undefined || values.seed === '') throw new UsageError('sprinkle needs --seed');
  const poisson = values.poisson === true;
  if (values.n !== undefined && values.density !== undefined) throw new UsageError('give --n or --density, not both');
  if (values.density !== undefined && !poisson) throw new UsageError('--density sets a Poisson sprinkling: add --poisson, or give --n');
  if (values.n === undefined && values.density === undefined) throw new UsageError('sprinkle needs --n (or --poisson --density RHO)');
  const count = values.n !== undefined ? number(values.n as string, '--n') : undefined;
  if (count !== undefined && !(Number.isInteger(count) && count >= 1)) throw new UsageError(`--n must be a whole number ≥ 1, got "${values.n}"`);
  const density = values.density !== undefined ? number(values.density as string, '--density') : undefined;
  if (density !== undefined && !(density > 0)) throw new UsageError('--density must be positive');
  const prng = (values.prng as string | undefined) ?? 'arc4';
  if (!['arc4', 'alea', 'xor4096'].includes(prng)) throw new UsageError(`--prng must be arc4, alea or xor4096, got "${prng}"`);
  const s = sprinkle({ region, process: poisson ? 'poisson' : 'fixed', count, density, seed: values.seed as string, prng: prng as 'arc4' });
  const csv = pointsCsv(s.points, s.dimension, region);
  const summary = { N: s.count, dimension: s.dimension, density: s.density, volume: s.volume, region, ...s.provenance };
  if (values.out !== undefined) {
    writeFileSync(values.out as string, csv);
    io.stdout(JSON.stringify({ ...summary, out: values.out }) + '\n');
  } else {
    io.stdout(csv);
    io.stderr(JSON.stringify(summary) + '\n');
  }
}

function vacuumRequest(values: Record<string, string | boolean | undefined>): VacuumRequest {
  if (values.points === undefined) throw new UsageError('--points points.csv is required');
  const { points, dimension } = readPointsCsv(values.points as string);
  const region = regionFromOptions(values);
  const density = values.density !== undefined ? number(values.density as string, '--density') : undefined;
  if (density !== undefined && !(density > 0)) throw new UsageError('--density must be positive');
  if (density !== undefined && region) throw new UsageError('give --density or --region, not both');
  const mass = values.mass !== undefined ? number(values.mass as string, '--mass') : 0;
  if (mass < 0) throw new UsageError('--mass must be ≥ 0');
  let truncation;
  if (values.truncation !== undefined) {
    try {
      truncation = parseTruncationRule(values.truncation as string);
    } catch (error) {
      throw new UsageError((error as Error).message);
    }
  }
  const backend = (values.backend as string | undefined) ?? 'auto';
  if (!['auto', 'native', 'ml-matrix'].includes(backend)) throw new UsageError(`--backend must be auto, native or ml-matrix, got "${backend}"`);
  const engine = (values.engine as string | undefined) ?? 'auto';
  if (!(engineRequests as readonly string[]).includes(engine)) throw new UsageError(`--engine must be auto, dense or structured, got "${engine}"`);
  return {
    engine: engine as EngineRequest,
    source: { kind: 'points', points, dimension, density, region: region ?? undefined },
    mass,
    truncation,
    backend: backend as 'auto',
  };
}

function progressHooks(io: Io) {
  return io.progress ? { onProgress: (stage: string, fraction: number) => fraction === 0 && io.stderr(`tacet: ${stage}…\n`) } : {};
}

function common(result: VacuumResult) {
  return {
    engineVersion: result.engineVersion,
    engine: result.engine,
    backend: result.backend,
    N: result.N,
    dimension: result.dimension,
    density: result.density,
    volume: result.volume,
    mass: result.mass,
    truncation: formatTruncationRule(result.truncation),
    cutoff: result.cutoff,
    cautions: result.cautions,
  };
}

async function runVacuum(args: string[], io: Io): Promise<void> {
  const values = parse(args, computeOptions);
  if (values.help) return io.stdout(commandHelp('vacuum'));
  const result = await computeVacuum(vacuumRequest(values), progressHooks(io));
  const out = {
    ...common(result),
    modesKept: result.modesKept,
    knee: result.knee,
    relations: result.relations,
    links: result.links,
    eigenvalues: Array.from(result.eigenvalues),
    diagnostics: result.diagnostics,
    timings: result.timings,
  };
  if (values.json) return io.stdout(JSON.stringify(out) + '\n');
  const d = result.diagnostics;
  io.stdout(
    [
      `N = ${out.N} (${out.dimension}D), density ${out.density ?? 'unknown'}, mass ${out.mass}, engine ${out.engine}, backend ${out.backend}`,
      `largest eigenvalues of iΔ: ${out.eigenvalues.slice(0, 5).map((v) => formatQuantity(v, 'spectral')).join(', ')}`,
      `truncation ${out.truncation}: λ_c = ${formatQuantity(out.cutoff, 'cut')}, ${out.modesKept} of ${out.eigenvalues.length} positive modes kept`,
      `checks: ‖W−W†‖ ${formatQuantity(d.hermiticityError, 'residual')}, min eig W ${formatQuantity(d.smallestEigenvalue, 'residual')} (${d.smallestEigenvalueMethod}), ‖W−W̄−iΔc‖ ${formatQuantity(d.commutatorError, 'residual')}, ‖WW̄‖ ${formatQuantity(d.orthogonalityError, 'residual')}, tr W ${formatCheckPair(d.trace, d.positiveEigenvalueSum, 'spectral').first} (tr W − Σλ kept ${formatCheckPair(d.trace, d.positiveEigenvalueSum, 'spectral').difference})`,
      ...result.cautions.map((c) => `caution: ${c}`),
    ].join('\n') + '\n',
  );
}

/** A subregion in the text form of parseSubregion; a malformed one names its option. */
function subregionOption(values: Record<string, string | boolean | undefined>, option: 'subregion' | 'a' | 'b', needed: string): SubregionSpec {
  const text = values[option] as string | undefined;
  if (text === undefined) throw new UsageError(`${needed} needs --${option} diamond:T0,X0:T1,X1 or elements:I,J,...`);
  try {
    return parseSubregion(text);
  } catch (error) {
    throw new UsageError(`--${option}: ${(error as Error).message}`);
  }
}

const entropyRuleOptions = { double: { type: 'boolean' }, 'restricted-cut': { type: 'string' } } as const satisfies ParseArgsConfig['options'];

/** --double and --restricted-cut onto the request: the rule of every entropy the request computes. */
function applyEntropyRule(values: Record<string, string | boolean | undefined>, request: VacuumRequest): void {
  request.doubleTruncation = values.double === true;
  if (values['restricted-cut'] === undefined) return;
  let cut;
  try {
    cut = parseRestrictedCut(values['restricted-cut'] as string);
  } catch (error) {
    throw new UsageError(`--restricted-cut: ${(error as Error).message}`);
  }
  if (cut === null && request.doubleTruncation) throw new UsageError('--double asks for a second cut and --restricted-cut none for none: give one of them');
  if (cut !== null) {
    request.doubleTruncation = true;
    request.restrictedCut = cut;
  }
}

/** The rule settings an entropy was computed with, as the JSON of entropy and mutual-information gives them. */
function entropyRuleFields(result: VacuumResult, e: EntropyResult) {
  return {
    doubleTruncation: e.doubleTruncation,
    restrictedCut: e.restrictedCut ? formatRestrictedCut(e.restrictedCut) : null,
    rule: entropyRuleLabel({ truncation: result.truncation, doubleTruncation: e.doubleTruncation, restrictedCut: e.restrictedCut }),
  };
}

function cautionLines(result: VacuumResult): string {
  return result.cautions.map((c) => `caution: ${c}\n`).join('');
}

async function runEntropy(args: string[], io: Io): Promise<void> {
  const values = parse(args, { ...computeOptions, ...entropyRuleOptions, subregion: { type: 'string' }, renyi: { type: 'string' }, complement: { type: 'boolean' } });
  if (values.help) return io.stdout(commandHelp('entropy'));
  const subregion = subregionOption(values, 'subregion', 'entropy');
  let renyi;
  if (values.renyi !== undefined) {
    try {
      renyi = parseRenyiOrders(values.renyi as string);
    } catch (error) {
      throw new UsageError(`--renyi: ${(error as Error).message}`);
    }
  }
  const request = vacuumRequest(values);
  request.subregion = subregion;
  applyEntropyRule(values, request);
  if (renyi) request.renyi = renyi;
  if (values.complement) request.complement = true;
  const result = await computeVacuum(request, progressHooks(io));
  const e = result.entropy!;
  // the engine's values key by key; the text lists them sorted, as every table does (JSON objects put
  // integer-like keys such as "2" first whatever the order, so the JSON order is not ours to choose)
  const orders = renyi ? sortedRenyiOrders(renyi) : [];
  const renyiValues = renyi ? Object.fromEntries(orders.map((order) => [renyiKey(order), engineValue(e.renyi, renyiKey(order), '--renyi')])) : null;
  const complement = values.complement ? required(result.complement, '--complement') : null;
  const out = {
    ...common(result),
    wholeRegionModesKept: result.modesKept,
    n: e.n,
    S: e.S,
    modesKept: e.modesKept,
    subregionCutoff: e.cutoff,
    ...entropyRuleFields(result, e),
    ...(renyiValues ? { renyi: renyiValues } : {}),
    ...(complement ? { complement: { S: complement.S, n: complement.n, difference: complement.difference } } : {}),
    generalizedEigenvalues: Array.from(e.generalizedEigenvalues),
    timings: result.timings,
  };
  if (values.json) return io.stdout(JSON.stringify(out) + '\n');
  const lines = [`S = ${formatEntropy(e.S)} for n = ${e.n} of N = ${result.N} elements (${out.rule}), ${e.modesKept} modes of iΔ_O kept`];
  if (renyiValues) lines.push(`Rényi: ${orders.map((order) => `${renyiLabel(order)} = ${formatEntropy(renyiValues[renyiKey(order)])}`).join(', ')}`);
  if (complement) {
    lines.push(`complement O′: S = ${formatEntropy(complement.S)} for n = ${complement.n} elements; S_O′ − S_O = ${belowEntropyFloor(complement.difference) ? formatEntropy(complement.difference) : formatSignificantDigits(complement.difference, 2)}`);
  }
  io.stdout(lines.join('\n') + '\n' + cautionLines(result));
}

async function runMutualInformation(args: string[], io: Io): Promise<void> {
  const values = parse(args, { ...computeOptions, ...entropyRuleOptions, a: { type: 'string' }, b: { type: 'string' } });
  if (values.help) return io.stdout(commandHelp('mutual-information'));
  const a = subregionOption(values, 'a', 'mutual-information');
  const b = subregionOption(values, 'b', 'mutual-information');
  const request = vacuumRequest(values);
  request.mutualInformation = { a, b };
  applyEntropyRule(values, request);
  const result = await computeVacuum(request, progressHooks(io));
  const mi = required(result.mutualInformation, '--a/--b');
  const out = {
    ...common(result),
    wholeRegionModesKept: result.modesKept,
    S_A: mi.a.S,
    S_B: mi.b.S,
    S_AB: mi.union.S,
    I: mi.I,
    n_A: mi.a.n,
    n_B: mi.b.n,
    ...entropyRuleFields(result, mi.union),
    timings: result.timings,
  };
  if (values.json) return io.stdout(JSON.stringify(out) + '\n');
  io.stdout(
    [
      `S_A = ${formatEntropy(mi.a.S)} (n_A = ${mi.a.n}), S_B = ${formatEntropy(mi.b.S)} (n_B = ${mi.b.n}), S_AB = ${formatEntropy(mi.union.S)} (n = ${mi.union.n})`,
      `I(A:B) = S_A + S_B − S_AB = ${formatQuantity(mi.I, 'entropy')} for N = ${result.N} elements (${out.rule}), engine ${result.engine}`,
    ].join('\n') +
      '\n' +
      cautionLines(result),
  );
}

/** A part of the result the request asked for; its absence is an engine fault (exit 1), not bad input. */
function required<T>(value: T | null, option: string): T {
  if (value === null) throw new Error(`the engine returned no result for ${option}`);
  return value;
}

function engineValue(values: Record<string, number> | null, key: string, option: string): number {
  const value = required(values, option)[key];
  if (value === undefined) throw new Error(`the engine returned no value for ${option} order ${key}`);
  return value;
}

/** The option that sets an engine request field, so a refusal names what to change. */
function optionOfField(field: string): string | null {
  const [head, part] = field.split('.');
  if (head === 'mutualInformation') return part === 'a' ? '--a' : part === 'b' ? '--b' : '--a/--b';
  const options: Record<string, string> = {
    subregion: '--subregion',
    truncation: '--truncation',
    engine: '--engine',
    mass: '--mass',
    doubleTruncation: '--double',
    restrictedCut: '--restricted-cut',
    renyi: '--renyi',
    complement: '--complement',
  };
  return options[head] ?? null;
}

/** Points of any dimension: a header t then one or more space columns; every field a finite number. */
function readPointsOfAnyDimension(path: string): { points: Float64Array; dimension: number; header: string } {
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch (error) {
    throw new UsageError(`cannot read points file ${path}: ${(error as NodeJS.ErrnoException).code ?? (error as Error).message}`);
  }
  const lines = text.split(/\r?\n/).filter((line) => line.trim() !== '' && !line.trimStart().startsWith('#'));
  if (lines.length === 0) throw new UsageError(`${path} is empty; expected a header t,x (or t,x,y, t,x,y,z, …)`);
  const header = lines[0].split(',').map((h) => h.trim().toLowerCase());
  if (header[0] !== 't' || header.length < 2) throw new UsageError(`${path}: header must start with t and name at least one space column (t,x / t,x,y / t,x,y,z), got "${lines[0].trim()}"`);
  const dimension = header.length;
  const points = new Float64Array((lines.length - 1) * dimension);
  for (let row = 1; row < lines.length; row++) {
    const fields = lines[row].split(',');
    if (fields.length !== dimension) throw new UsageError(`${path} line ${row + 1}: expected ${dimension} columns (${header.join(',')}), got ${fields.length}`);
    fields.forEach((field, k) => {
      const v = field.trim() === '' ? Number.NaN : Number(field);
      if (!Number.isFinite(v)) throw new UsageError(`${path} line ${row + 1}: ${header[k]} is not a finite number ("${field.trim()}")`);
      points[(row - 1) * dimension + k] = v;
    });
  }
  if (lines.length - 1 < 2) throw new UsageError(`${path} holds ${lines.length - 1} point(s); at least 2 are needed`);
  return { points, dimension, header: header.join(',') };
}

/** `tacet inspect`: counts and dimension estimators of a causal set (server/engine/manifoldLikeness.ts). */
function runInspect(args: string[], io: Io): void {
  const values = parse(args, { ...regionOptions, points: { type: 'string' }, relations: { type: 'string' }, count: { type: 'string' }, 'max-gap': { type: 'string' }, json: { type: 'boolean' }, help: { type: 'boolean', short: 'h' } });
  if (values.help) return io.stdout(commandHelp('inspect'));
  if ((values.points === undefined) === (values.relations === undefined)) throw new UsageError('inspect needs exactly one of --points FILE and --relations FILE');
  const maxGap = values['max-gap'] === undefined ? 10 : number(values['max-gap'] as string, '--max-gap');
  if (!(Number.isInteger(maxGap) && maxGap >= 0 && maxGap <= 1000)) throw new UsageError(`--max-gap must be a whole number from 0 to 1000, got ${values['max-gap']}`);
  let report: ManifoldLikeness;
  let dimension: number | null = null;
  if (values.relations !== undefined) {
    if (values.count === undefined) throw new UsageError('--relations needs --count N, the number of elements (labels 0 … N−1)');
    if (values.region !== undefined) throw new UsageError('--region applies to --points; a relation list has no coordinates');
    const count = number(values.count as string, '--count');
    let bytes: Buffer;
    try {
      bytes = readFileSync(values.relations as string);
    } catch (error) {
      throw new UsageError(`cannot read relations file ${values.relations}: ${(error as NodeJS.ErrnoException).code ?? (error as Error).message}`);
    }
    let parsed;
    try {
      parsed = parseRelationList(bytes, { count, limit: { maxElements: RELATION_INSPECT_LIMIT, reason: 'inspect builds the N × N relation of a relation list' } });
    } catch (error) {
      if (error instanceof CausalSetFileError) throw new UsageError(`${values.relations}: ${error.message}`);
      throw error;
    }
    report = manifoldLikeness({ kind: 'relation', causal: parsed.causal }, { maxGap });
  } else {
    const { points, dimension: d } = readPointsOfAnyDimension(values.points as string);
    dimension = d;
    const region = regionFromOptions(values);
    const geometry = region ? makeRegion(region) : null;
    if (region && geometry && geometry.dimension !== d) throw new UsageError(`--region ${region.kind} is ${geometry.dimension}D but ${values.points} has ${d} columns`);
    try {
      report = manifoldLikeness({ kind: 'points', points, dimension: d, periodX: geometry?.periodX }, { maxGap });
    } catch (error) {
      if (error instanceof RangeError) throw new UsageError(error.message);
      throw error;
    }
  }
  const out = {
    N: report.N,
    relations: report.relations,
    links: report.links,
    longestChain: report.longestChain,
    orderingFraction: report.orderingFraction,
    dimension: {
      myrheimMeyer: { estimate: report.dimension.myrheimMeyer.estimate, error: report.dimension.myrheimMeyer.error, subIntervals: report.dimension.myrheimMeyer.subIntervals },
      midpoint: { estimate: report.dimension.midpoint.estimate, halfSize: report.dimension.midpoint.halfSize },
    },
    intervalAbundances: report.intervalAbundances,
    ...(dimension !== null ? { columns: dimension } : {}),
  };
  if (values.json) return io.stdout(JSON.stringify(out) + '\n');
  const mm = report.dimension.myrheimMeyer;
  const lines = [
    `N = ${report.N}, relations ${report.relations}, links ${report.links}, longest chain ${report.longestChain}, ordering fraction ${formatQuantity(report.orderingFraction, 'measure')}`,
    `Myrheim–Meyer dimension ${mm.estimate === null ? '—' : formatDimension(mm.estimate, mm.error)}${mm.error === null ? ' (too few sub-intervals for an error)' : ` (error from ${mm.subIntervals} sub-intervals)`}; midpoint-scaling dimension ${report.dimension.midpoint.estimate === null ? '—' : formatDimension(report.dimension.midpoint.estimate, null)}`,
    `interval abundances N_k, k = 0 … ${maxGap}: ${report.intervalAbundances.join(' ')}`,
  ];
  if (dimension !== null) {
    // a file's N stands for ρV: exact for a fixed-N sprinkling, the Poisson mean's estimate otherwise
    const ratio = report.longestChain / Math.pow(report.N, 1 / dimension);
    const m = longestChainConstant(dimension);
    lines.push(`longest chain / N^(1/${dimension}) = ${formatQuantity(ratio, 'fit')} (a ${dimension}D diamond tends to ${m.low === m.high ? m.low : `${m.low}–${m.high}`}, from below)`);
  }
  lines.push('Both estimators assume a causal diamond of flat spacetime; other regions and small N read differently.');
  io.stdout(lines.join('\n') + '\n');
}

const commands: Record<CommandName, (args: string[], io: Io) => void | Promise<void>> = {
  sprinkle: runSprinkle,
  vacuum: runVacuum,
  entropy: runEntropy,
  'mutual-information': runMutualInformation,
  inspect: runInspect,
  submit: (args, io) => remoteCommand(submit, args, io),
  fetch: (args, io) => remoteCommand(fetchWork, args, io),
  reproduce: runReproduce,
};

async function runReproduce(args: string[], io: Io): Promise<void> {
  const { values, positionals } = parseArgs({ args, options: { json: { type: 'boolean' }, help: { type: 'boolean', short: 'h' } }, allowPositionals: true, strict: false });
  if (values.help) return io.stdout(commandHelp('reproduce'));
  const unknown = args.find((a) => a.startsWith('-') && a !== '--json');
  if (unknown) throw new UsageError(`reproduce: unknown option ${unknown}; use --json`);
  if (positionals.length !== 1) throw new UsageError('reproduce needs one bundle: tacet reproduce BUNDLE.zip [--json]');
  try {
    await reproduceBundle(positionals[0]!, { json: values.json === true }, io);
  } catch (error) {
    if (error instanceof BundleRefusedError) throw new Error(`the bundle is refused: ${error.message}`);
    throw error;
  }
}

/** A command that talks to the service; its help is local, its usage errors are this CLI's. */
async function remoteCommand(command: typeof submit, args: string[], io: Io): Promise<void> {
  const name = command === submit ? 'submit' : 'fetch';
  if (args.includes('--help') || args.includes('-h')) return io.stdout(commandHelp(name));
  try {
    await command(args, { stdout: io.stdout, stderr: io.stderr, env: process.env });
  } catch (error) {
    if (error instanceof RemoteUsageError) throw new UsageError(error.message);
    throw error;
  }
}

function isCommand(name: string): name is CommandName {
  return (commandNames as readonly string[]).includes(name);
}

/** Runs the command line; returns the exit code (0 success, 2 bad input, 1 failure). */
export async function runCli(argv: string[], io: Partial<Io> = {}): Promise<number> {
  const sink: Io = {
    stdout: io.stdout ?? ((t) => process.stdout.write(t)),
    stderr: io.stderr ?? ((t) => process.stderr.write(t)),
    progress: io.progress ?? process.stderr.isTTY === true,
  };
  const [command, ...rest] = argv;
  try {
    if (command === undefined || command === '--help' || command === '-h' || command === 'help') {
      sink.stdout(OVERVIEW_HELP);
      return command === undefined ? 2 : 0;
    }
    if (!isCommand(command)) throw new UsageError(`unknown command "${command}"; use ${commandNames.join(', ')} (tacet --help)`);
    await commands[command](rest, sink);
    return 0;
  } catch (error) {
    if (error instanceof UsageError || error instanceof EngineInputError || error instanceof ZodError) {
      let message = error instanceof ZodError ? error.issues.map((i) => i.message).join('; ') : error.message;
      const option = error instanceof EngineInputError && error.field ? optionOfField(error.field) : null;
      if (option && !message.startsWith(option)) message = `${option}: ${message}`;
      sink.stderr(`tacet: ${message.replace(/\s*\n\s*/g, ' ')}\n`);
      return 2;
    }
    sink.stderr(`tacet: failed: ${(error as Error).message ?? String(error)}\n`);
    return 1;
  }
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  process.exitCode = await runCli(process.argv.slice(2));
}
