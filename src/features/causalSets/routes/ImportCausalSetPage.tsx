import { useState, type FormEvent } from 'react';
import { Link, useNavigate } from 'react-router';
import { CAUSAL_SET_FILE_LIMIT_BYTES } from '@shared/causalSets';
import { regionDimension, regionKindsOfDimension, type RegionFieldWording } from '@shared/regions';
import { isApiError } from '../../../lib/apiClient';
import type { FieldErrors } from '../../../lib/forms';
import { Button } from '../../../ui/Button';
import { SelectField, TextField } from '../../../ui/Field';
import { PageHeader, Section } from '../../../ui/Page';
import { RegionFields } from '../../../ui/RegionFields';
import { regionProposalText } from '@shared/regionProposal';
import { Empty } from '../../../ui/States';
import { useCan } from '../../../lib/permissions';
import { useCausalSets, useUploadCausalSet } from '../api/causalSets';
import {
  defaultImportForm,
  formatBytes,
  importFieldFor,
  metadataFromForm,
  nameFromFileName,
  sniffFile,
  formWithRegion,
  type FileSniff,
  type ImportFormValues,
} from '../lib/importForm';

function Choice<T extends string>({ name, value, current, onChange, label, hint }: { name: string; value: T; current: T; onChange(v: T): void; label: string; hint: string }) {
  return (
    <label className="flex cursor-pointer items-start gap-2.5 text-sm">
      <input type="radio" name={name} value={value} checked={current === value} onChange={() => onChange(value)} className="mt-0.5 size-4 cursor-pointer accent-accent" />
      <span>
        <span className="text-ink">{label}</span>
        <span className="block text-xs text-ink-faint">{hint}</span>
      </span>
    </label>
  );
}

/** Problems the server found in the file, one per row, in file order. */
function FileProblems({ message, problems }: { message: string; problems: string[] }) {
  return (
    <div role="alert" className="border-l-2 border-danger pl-3 text-sm">
      <p className="text-danger">The file was not imported; nothing was stored.</p>
      {problems.length > 1 ? (
        <ul className="figures mt-2 flex flex-col gap-0.5 text-xs text-danger" aria-label="Problems in the file">
          {problems.map((p) => (
            <li key={p}>{p}</li>
          ))}
        </ul>
      ) : (
        <p className="figures mt-1 text-xs text-danger">{message}</p>
      )}
    </div>
  );
}

/** The import form's words: T for the proper time, C for the circumference (DEVELOPERS.md, Look and words), ranges "from … to". */
const importRegionWording: RegionFieldWording = {
  properTime: { label: 'Proper time T between the tips', hint: null },
  circumference: { label: 'Circumference C', hint: 'x in [−C/2, C/2)' },
  tMin: { label: 't from' },
  tMax: { label: 't to' },
  xMin: { label: 'x from' },
  xMax: { label: 'x to' },
};

export function ImportCausalSetPage() {
  const canCompute = useCan('compute');
  const list = useCausalSets();
  const limits = list.data?.limits;
  const maxFileBytes = limits?.maxFileBytes ?? CAUSAL_SET_FILE_LIMIT_BYTES;
  const upload = useUploadCausalSet();
  const navigate = useNavigate();
  const [values, setValues] = useState<ImportFormValues>(defaultImportForm);
  const [file, setFile] = useState<File | null>(null);
  const [sniff, setSniff] = useState<FileSniff | null>(null);
  const [errors, setErrors] = useState<FieldErrors>({});
  const [serverError, setServerError] = useState<{ message: string; problems: string[] } | null>(null);

  const set = <K extends keyof ImportFormValues>(key: K, value: ImportFormValues[K]) => setValues((v) => ({ ...v, [key]: value }));

  async function pick(chosen: File | null) {
    setFile(chosen);
    setServerError(null);
    setErrors((e) => ({ ...e, file: '' }));
    setSniff(null);
    if (!chosen) return;
    if (chosen.size > maxFileBytes) {
      setErrors((e) => ({ ...e, file: `The file has ${formatBytes(chosen.size)}; the upload limit is ${formatBytes(maxFileBytes)}.` }));
      return;
    }
    const found = sniffFile(await chosen.text());
    setSniff(found);
    setValues((v) => ({
      ...v,
      name: v.name || nameFromFileName(chosen.name),
      ...(found.kind ? { kind: found.kind } : {}),
      // a region of the file's dimension: the first kind of it unless the one picked already is
      ...(found.kind === 'coordinates' && found.dimension !== null && regionDimension(v.regionKind) !== found.dimension ? { regionKind: regionKindsOfDimension(found.dimension)[0]! } : {}),
      ...(found.countGuess !== null && !v.count ? { count: String(found.countGuess) } : {}),
    }));
  }

  async function submit(event: FormEvent) {
    event.preventDefault();
    setServerError(null);
    const checked = metadataFromForm(values);
    const found: FieldErrors = checked.ok ? {} : { ...checked.errors };
    if (!file) found.file = 'Choose the file to import.';
    else if (file.size > maxFileBytes) found.file = `The file has ${formatBytes(file.size)}; the upload limit is ${formatBytes(maxFileBytes)}.`;
    setErrors(found);
    if (!checked.ok || !file || found.file) return;
    try {
      const { id } = await upload.mutateAsync({ metadata: checked.metadata, file });
      navigate(`/causal-sets/${id}`);
    } catch (error) {
      if (isApiError(error) && error.code === 'validation_failed') {
        const byField: FieldErrors = {};
        for (const issue of error.issues) byField[importFieldFor(issue.path)] ??= issue.message;
        setErrors(byField);
        setServerError(null);
      } else if (isApiError(error)) {
        setServerError({ message: error.message, problems: error.issues.map((i) => i.message) });
      } else {
        setServerError({ message: error instanceof Error ? error.message : 'The upload failed.', problems: [] });
      }
    }
  }

  if (!canCompute) {
    return (
      <>
        <PageHeader title="Import a causal set" />
        <Empty>
          Viewers read and download imported causal sets but do not import them. Ask an owner of the team for the researcher role.{' '}
          <Link to="/causal-sets" className="text-accent hover:underline">
            Back to the causal sets
          </Link>
        </Empty>
      </>
    );
  }

  const coordinates = values.kind === 'coordinates';
  return (
    <>
      <PageHeader
        title="Import a causal set"
        context="Bring a sprinkling or a causal order from your own generator; it is checked completely before anything is stored."
        actions={
          <Link to="/causal-sets" className="text-sm text-accent hover:underline">
            All causal sets
          </Link>
        }
      />
      <form onSubmit={submit} noValidate className="grid max-w-5xl grid-cols-1 gap-x-16 gap-y-2 lg:grid-cols-[1fr_22rem]" aria-label="Import a causal set">
        <div>
          <Section title="File">
            <div className="flex flex-col gap-2">
              <label htmlFor="causal-set-file" className="text-xs tracking-wide text-ink-soft">
                CSV file
              </label>
              <input
                id="causal-set-file"
                name="file"
                type="file"
                accept=".csv,.txt,text/csv,text/plain"
                aria-invalid={Boolean(errors.file)}
                aria-describedby="causal-set-file-message"
                onChange={(e) => void pick(e.target.files?.[0] ?? null)}
                className="text-sm text-ink file:mr-4 file:cursor-pointer file:rounded-sm file:border file:border-accent file:bg-transparent file:px-3 file:py-1 file:text-sm file:text-accent hover:file:bg-accent-soft"
              />
              <p id="causal-set-file-message" className={`text-xs ${errors.file ? 'text-danger' : 'text-ink-faint'}`} role={errors.file ? 'alert' : undefined}>
                {errors.file ||
                  (file
                    ? `${file.name} · ${formatBytes(file.size)}${sniff ? ` · ${sniff.rows} data rows` : ''}`
                    : `Up to ${formatBytes(maxFileBytes)} and ${limits?.maxElements ?? 'the engine’s limit of'} elements. Lines starting with # are notes.`)}
              </p>
              {sniff && (
                <pre className="figures mt-1 max-h-40 overflow-auto border-l-2 border-rule pl-3 text-xs text-ink-soft" aria-label="First lines of the file">
                  {sniff.head.join('\n')}
                </pre>
              )}
            </div>
          </Section>

          <Section title="What the file holds">
            <div className="flex flex-col gap-3">
              <Choice name="kind" value="coordinates" current={values.kind} onChange={(v) => set('kind', v)} label="Coordinates" hint="Header t,x (2D) or t,x,y,z (4D Minkowski), one element per row, units c = 1." />
              <Choice name="kind" value="relations" current={values.kind} onChange={(v) => set('kind', v)} label="Relations" hint="One pair i,j per row: element i precedes element j (labels 0 … N−1). Optional header i,j. Closed transitively on import." />
            </div>
          </Section>

          {coordinates ? (
            <Section title="Scale">
              <div className="mb-5 flex flex-col gap-3">
                <Choice name="scale" value="region" current={values.scale} onChange={(v) => set('scale', v)} label="The region the points lie in" hint="Its volume V gives ρ = N/V; every point is checked to lie inside." />
                <Choice name="scale" value="density" current={values.scale} onChange={(v) => set('scale', v)} label="The density ρ" hint="Elements per unit spacetime volume, if the region is not one of ours." />
              </div>
              {values.scale === 'region' ? (
                <div className="grid grid-cols-1 gap-5 sm:grid-cols-2">
                  <RegionFields
                    values={values}
                    onKindChange={(kind) => set('regionKind', kind)}
                    onFieldChange={(key, text) => set(key, text)}
                    kindError={errors.region}
                    fieldError={(key) => errors[key]}
                    wording={importRegionWording}
                    optionText="description"
                    inputClassName="figures"
                    selectClassName="sm:col-span-2"
                  />
                  {sniff?.proposal && (
                    <p className="flex flex-wrap items-center gap-x-3 gap-y-1 text-sm text-ink-soft sm:col-span-2" aria-label="Region proposed from the file">
                      <span>
                        Proposed from the file{sniff.proposal.from === 'recorded' ? ' (the region it records)' : ' (the smallest centred diamond holding its points)'}:{' '}
                        <span className="figures text-ink">{regionProposalText(sniff.proposal.region)}</span>
                      </span>
                      <Button variant="quiet" onClick={() => setValues((v) => formWithRegion(v, sniff.proposal!.region))}>
                        Use this region
                      </Button>
                    </p>
                  )}
                </div>
              ) : (
                <div className="max-w-xs">
                  <TextField label="Density ρ" name="density" inputMode="decimal" className="figures" value={values.density} onChange={(e) => set('density', e.target.value)} error={errors.density ?? errors.region} />
                </div>
              )}
            </Section>
          ) : (
            <Section title="Elements">
              <div className="grid grid-cols-1 gap-5 sm:grid-cols-3">
                <TextField label="Element count N" name="count" inputMode="numeric" className="figures" value={values.count} onChange={(e) => set('count', e.target.value)} error={errors.count} hint={sniff?.countGuess ? `largest label + 1 = ${sniff.countGuess}` : undefined} />
                <SelectField label="Dimension" name="dimension" value={values.dimension} onChange={(e) => set('dimension', e.target.value as '2' | '4')} error={errors.dimension} hint="chooses the Green function">
                  <option value="2">2</option>
                  <option value="4">4</option>
                </SelectField>
                <TextField label="Density ρ (optional)" name="density" inputMode="decimal" className="figures" value={values.density} onChange={(e) => set('density', e.target.value)} error={errors.density} hint="needed for a massive field or 4D" />
              </div>
            </Section>
          )}
        </div>

        <aside className="flex flex-col gap-6 lg:pt-1">
          <TextField label="Name" name="name" value={values.name} onChange={(e) => set('name', e.target.value)} error={errors.name} hint="How the set appears in tables and runs." />
          <p className="text-xs leading-relaxed text-ink-soft">
            Every row is checked: the header, numbers (no NaN or Inf), the width of each row, repeated points, points outside the region, labels out of range and cycles. A problem is reported with its row and column, and nothing is stored until the whole file is sound.
          </p>
          {serverError && <FileProblems message={serverError.message} problems={serverError.problems} />}
          <div>
            <Button type="submit" busy={upload.isPending}>
              Import
            </Button>
          </div>
        </aside>
      </form>
    </>
  );
}
