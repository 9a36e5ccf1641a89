import { useState } from 'react';
import {
  csvDoseFields,
  csvLevelFields,
  type CsvImportKind,
  type CsvImportResponse,
  type CsvMapping,
  type FhirImportResponse,
} from '@ebbtide/contracts';
import { Button } from '../../../components/ui/button';
import { Field, inputClass } from '../../../components/ui/field';
import { Panel } from '../../../components/ui/panel';
import { ErrorMessage } from '../../../components/ui/states';
import { useCourseContext } from '../../courses/components/course-layout';
import { useImportCsv } from '../api/import-csv';
import { useImportFhir } from '../api/import-fhir';

function StatusCell({ status, reasons }: { status: string; reasons: string[] }) {
  return (
    <td>
      <span
        className={
          status === 'refused'
            ? 'font-semibold text-red-800'
            : status === 'accepted'
              ? 'text-emerald-800'
              : 'text-slate-500'
        }
      >
        {status}
      </span>
      {reasons.length > 0 && (
        <ul className="list-disc pl-4 text-xs text-red-800">
          {reasons.map((r) => (
            <li key={r}>{r}</li>
          ))}
        </ul>
      )}
    </td>
  );
}

function CsvImport({ courseId }: { courseId: string }) {
  const [file, setFile] = useState<File | null>(null);
  const [kind, setKind] = useState<CsvImportKind>('doses');
  const [mapping, setMapping] = useState<CsvMapping | null>(null);
  const [preview, setPreview] = useState<CsvImportResponse | null>(null);
  const importCsv = useImportCsv(courseId);
  const fields = kind === 'doses' ? csvDoseFields : csvLevelFields;
  const run = async (mode: 'preview' | 'commit') => {
    if (!file) return;
    try {
      const result = await importCsv.mutateAsync({
        file,
        kind,
        mode,
        ...(mapping ? { mapping } : {}),
      });
      setPreview(result);
      setMapping(result.mapping);
    } catch {
      // Shown from the mutation's error.
    }
  };
  return (
    <div className="flex flex-col gap-3">
      <div className="flex flex-wrap items-end gap-3">
        <Field label="CSV file">
          {(a) => (
            <input
              {...a}
              type="file"
              accept=".csv,text/csv"
              className="text-sm"
              onChange={(e) => {
                setFile(e.target.files?.[0] ?? null);
                setPreview(null);
                setMapping(null);
              }}
            />
          )}
        </Field>
        <Field label="Rows are">
          {(a) => (
            <select
              {...a}
              className={inputClass}
              value={kind}
              onChange={(e) => {
                setKind(e.target.value as CsvImportKind);
                setMapping(null);
                setPreview(null);
              }}
            >
              <option value="doses">doses given</option>
              <option value="levels">levels measured</option>
            </select>
          )}
        </Field>
        <Button
          variant="secondary"
          disabled={!file || importCsv.isPending}
          onClick={() => run('preview')}
        >
          Preview
        </Button>
      </div>
      {importCsv.isError && <ErrorMessage error={importCsv.error} what="read the file" />}
      {preview && (
        <>
          <fieldset className="flex flex-wrap gap-3 rounded border border-slate-200 p-2">
            <legend className="px-1 text-xs font-semibold text-slate-700">
              Column for each field
            </legend>
            {fields.map((f) => (
              <Field
                key={f}
                label={f}
                error={preview.missingFields.includes(f) ? 'required: choose a column' : undefined}
              >
                {(a) => (
                  <select
                    {...a}
                    className={inputClass}
                    value={mapping?.[f] ?? ''}
                    onChange={(e) =>
                      setMapping({ ...(mapping ?? {}), [f]: e.target.value || null })
                    }
                  >
                    <option value="">(none)</option>
                    {preview.columns.map((c) => (
                      <option key={c}>{c}</option>
                    ))}
                  </select>
                )}
              </Field>
            ))}
            <Button
              variant="secondary"
              className="self-end"
              onClick={() => run('preview')}
              disabled={importCsv.isPending}
            >
              Preview again with this mapping
            </Button>
          </fieldset>
          <p className="text-sm" role="status">
            {preview.committed
              ? `Saved ${preview.createdIds.length} rows.`
              : `${preview.acceptedCount} rows can be saved, ${preview.refusedCount} are refused. Nothing is saved unless every row is accepted.`}
          </p>
          <table className="w-full text-left text-sm">
            <thead className="border-b border-slate-200 text-xs text-slate-600 [&_th]:py-1 [&_th]:pr-3">
              <tr>
                <th scope="col">Row</th>
                <th scope="col">Reads as</th>
                <th scope="col">Status</th>
              </tr>
            </thead>
            <tbody className="[&_td]:py-1 [&_td]:pr-3 [&_td]:align-top">
              {preview.rows.map((r) => (
                <tr
                  key={r.rowNumber}
                  className={`border-b border-slate-100 ${r.status === 'refused' ? 'bg-red-50' : ''}`}
                >
                  <td>{r.rowNumber}</td>
                  <td className="max-w-xl break-words">{r.echo ?? describeRawRow(r.values)}</td>
                  <StatusCell status={r.status} reasons={r.reasons} />
                </tr>
              ))}
            </tbody>
          </table>
          {!preview.committed && (
            <Button
              disabled={
                preview.refusedCount > 0 || preview.acceptedCount === 0 || importCsv.isPending
              }
              onClick={() => run('commit')}
            >
              Save all {preview.acceptedCount} rows
            </Button>
          )}
        </>
      )}
    </div>
  );
}

function FhirImport({ courseId }: { courseId: string }) {
  const [bundle, setBundle] = useState<Record<string, unknown> | null>(null);
  const [readError, setReadError] = useState<string | null>(null);
  const [preview, setPreview] = useState<FhirImportResponse | null>(null);
  const importFhir = useImportFhir(courseId);
  const run = async (mode: 'preview' | 'commit') => {
    if (!bundle) return;
    try {
      setPreview(
        await importFhir.mutateAsync({
          bundle: bundle as { resourceType: 'Bundle' },
          mode,
          courseId,
        }),
      );
    } catch {
      // Shown from the mutation's error.
    }
  };
  return (
    <div className="flex flex-col gap-3">
      <div className="flex flex-wrap items-end gap-3">
        <Field label="FHIR R4 Bundle (JSON)" error={readError ?? undefined}>
          {(a) => (
            <input
              {...a}
              type="file"
              accept=".json,application/fhir+json,application/json"
              className="text-sm"
              onChange={async (e) => {
                setPreview(null);
                setReadError(null);
                const f = e.target.files?.[0];
                if (!f) return setBundle(null);
                try {
                  const parsed = JSON.parse(await f.text()) as Record<string, unknown>;
                  if (parsed.resourceType !== 'Bundle')
                    throw new Error('the file is not a FHIR Bundle');
                  setBundle(parsed);
                } catch (err) {
                  setBundle(null);
                  setReadError(err instanceof Error ? err.message : String(err));
                }
              }}
            />
          )}
        </Field>
        <Button
          variant="secondary"
          disabled={!bundle || importFhir.isPending}
          onClick={() => run('preview')}
        >
          Preview
        </Button>
      </div>
      {importFhir.isError && <ErrorMessage error={importFhir.error} what="read the bundle" />}
      {preview && (
        <>
          <p className="text-sm" role="status">
            {preview.committed
              ? `Saved ${preview.acceptedCount} entries.`
              : `${preview.acceptedCount} entries can be saved, ${preview.refusedCount} are refused. Nothing is saved unless none is refused.`}
            {preview.unknownCodes.length > 0 &&
              ` Codes not mapped (not imported): ${preview.unknownCodes.join(', ')}.`}
          </p>
          <table className="w-full text-left text-sm">
            <thead className="border-b border-slate-200 text-xs text-slate-600 [&_th]:py-1 [&_th]:pr-3">
              <tr>
                <th scope="col">Resource</th>
                <th scope="col">Becomes</th>
                <th scope="col">Reads as</th>
                <th scope="col">Status</th>
              </tr>
            </thead>
            <tbody className="[&_td]:py-1 [&_td]:pr-3 [&_td]:align-top">
              {preview.entries.map((r, i) => (
                <tr
                  key={i}
                  className={`border-b border-slate-100 ${r.status === 'refused' ? 'bg-red-50' : ''}`}
                >
                  <td>{r.resource}</td>
                  <td>{r.target}</td>
                  <td>{r.echo ?? '—'}</td>
                  <StatusCell status={r.status} reasons={r.reasons} />
                </tr>
              ))}
            </tbody>
          </table>
          {!preview.committed && (
            <Button
              disabled={preview.refusedCount > 0 || importFhir.isPending}
              onClick={() => run('commit')}
            >
              Save all {preview.acceptedCount} entries
            </Button>
          )}
        </>
      )}
    </div>
  );
}

export function ImportScreen() {
  const { course } = useCourseContext();
  return (
    <div className="grid gap-4 xl:grid-cols-2">
      <Panel title="CSV upload">
        <CsvImport courseId={course.id} />
      </Panel>
      <Panel title="FHIR bundle upload">
        <FhirImport courseId={course.id} />
      </Panel>
    </div>
  );
}

/** A refused row has no echo: show what was read, field by field, so the row wraps and the reason stays in view. */
function describeRawRow(values: Record<string, unknown> | null | undefined): string {
  if (!values) return 'nothing could be read';
  const parts = Object.entries(values)
    .filter(([, v]) => v !== null && v !== undefined && v !== '')
    .map(([k, v]) => `${k}: ${typeof v === 'object' ? JSON.stringify(v) : String(v)}`);
  return parts.length ? parts.join(' · ') : 'empty row';
}
