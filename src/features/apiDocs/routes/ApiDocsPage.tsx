import { useQuery } from '@tanstack/react-query';
import { Link } from 'react-router';
import { api } from '../../../lib/apiClient';
import { Markdown } from '../../../ui/Markdown';
import { PageHeader, Section } from '../../../ui/Page';
import { ErrorState, Loading } from '../../../ui/States';
import { describeType, operationsByTag, type JsonSchema, type OpenApiDocument, type OperationEntry } from '../lib/openApi';

/**
 * The API reference, read from /api/openapi.json (generated from the shared zod schemas), so it is
 * always the description the server itself serves. Public, like the description.
 */
export function ApiDocsPage() {
  const doc = useQuery({
    queryKey: ['openapi'],
    queryFn: ({ signal }) => api.get<OpenApiDocument>('/api/openapi.json', { signal, withoutTeam: true }),
    staleTime: Infinity,
  });

  return (
    <main className="mx-auto max-w-5xl px-6 py-10">
      <Link to="/" className="mb-6 inline-block text-sm text-accent underline underline-offset-4">
        ← Back to Tacet
      </Link>
      <PageHeader
        title="Tacet API reference"
        context={
          <>
            Generated from the server's schemas ·{' '}
            <a className="text-accent underline underline-offset-4" href="/api/openapi.json">
              openapi.json
            </a>
            {doc.data ? ` · version ${doc.data.info.version}` : ''}
          </>
        }
      />
      {doc.isPending ? (
        <Loading label="Loading the API description" />
      ) : doc.isError ? (
        <ErrorState error={doc.error} onRetry={() => doc.refetch()} />
      ) : (
        <>
          <Markdown className="mb-8 max-w-3xl text-sm text-ink-soft" text={doc.data.info.description ?? ''} />
          {operationsByTag(doc.data).map(([tag, entries]) => (
            <Section key={tag} title={tag}>
              <ul className="flex flex-col">
                {entries.map((entry) => (
                  <OperationItem key={`${entry.method} ${entry.path}`} entry={entry} />
                ))}
              </ul>
            </Section>
          ))}
        </>
      )}
    </main>
  );
}

function OperationItem({ entry }: { entry: OperationEntry }) {
  const { method, path, operation } = entry;
  const params = operation.parameters ?? [];
  const body = Object.entries(operation.requestBody?.content ?? {})[0];
  const responses = Object.entries(operation.responses ?? {});
  return (
    <li className="border-t border-rule">
      <details>
        <summary className="flex cursor-pointer items-baseline gap-4 py-2 text-sm">
          <span className="figures w-16 shrink-0 font-semibold uppercase text-accent">{method}</span>
          <span className="figures shrink-0">{path}</span>
          <Markdown className="text-ink-soft [&_p]:mb-0" text={operation.summary ?? ''} />
        </summary>
        <div className="flex flex-col gap-4 pb-4 pl-20 text-sm">
          {operation.description && <Markdown className="text-ink-soft" text={operation.description} />}
          {params.length > 0 && (
            <div>
              <h3 className="text-xs uppercase tracking-wide text-ink-soft">Parameters</h3>
              <ul>
                {params.map((p) => (
                  <li key={`${p.in}:${p.name}`} className="figures">
                    {p.name} <span className="text-ink-faint">({p.in}{p.required ? ', required' : ''})</span>: {p.schema ? describeType(p.schema) : 'any'}
                  </li>
                ))}
              </ul>
            </div>
          )}
          {body && (
            <div>
              <h3 className="text-xs uppercase tracking-wide text-ink-soft">Body ({body[0]})</h3>
              {body[1].schema && <SchemaView schema={body[1].schema} />}
            </div>
          )}
          <div>
            <h3 className="text-xs uppercase tracking-wide text-ink-soft">Responses</h3>
            <ul>
              {responses.map(([status, response]) => {
                const media = Object.entries(response.content ?? {})[0];
                return (
                  <li key={status} className="mt-1">
                    <span className="figures font-semibold">{status}</span> {response.description}
                    {media && status.startsWith('2') && media[1].schema && (
                      <div className="mt-1">
                        <span className="text-xs text-ink-faint">{media[0]}</span>
                        <SchemaView schema={media[1].schema} />
                      </div>
                    )}
                  </li>
                );
              })}
            </ul>
          </div>
        </div>
      </details>
    </li>
  );
}

/** Objects as nested field lists, everything else as a one-line type. */
function SchemaView({ schema, depth = 0 }: { schema: JsonSchema; depth?: number }) {
  const variants = schema.oneOf ?? schema.anyOf;
  if (variants && variants.some((v) => v.properties) && depth < 6) {
    return (
      <ol className="ml-4 list-decimal">
        {variants.map((variant, i) => (
          <li key={i}>
            <span className="text-xs text-ink-faint">one of</span>
            <SchemaView schema={variant} depth={depth + 1} />
          </li>
        ))}
      </ol>
    );
  }
  const object = schema.properties ? schema : schema.type === 'array' && schema.items?.properties ? schema.items : null;
  if (!object || depth >= 6) return <span className="figures">{describeType(schema)}</span>;
  const required = new Set(object.required ?? []);
  return (
    <ul className="ml-4 border-l border-rule pl-3">
      {schema !== object && <li className="text-xs text-ink-faint">array of</li>}
      {Object.entries(object.properties!).map(([name, field]) => (
        <li key={name}>
          <span className="figures">{name}</span>
          {!required.has(name) && <span className="text-ink-faint">?</span>}{' '}
          {field.properties || field.items?.properties || (field.oneOf ?? field.anyOf)?.some((v) => v.properties) ? (
            <SchemaView schema={field} depth={depth + 1} />
          ) : (
            <span className="figures text-ink-soft">{describeType(field)}</span>
          )}
          {field.default !== undefined && <span className="text-ink-faint"> = {JSON.stringify(field.default)}</span>}
        </li>
      ))}
    </ul>
  );
}
