import { Link } from 'react-router-dom';
import { Panel } from '../../../components/ui/panel';
import { Empty, ErrorMessage, Loading } from '../../../components/ui/states';
import { paths } from '../../../config/paths';
import { useLibraryModels } from '../api/get-drug-models';
import { anyFromMemory, asDefinition, eliminationLabel, structureLabel } from '../utils/model-view';
import { FromMemory } from './source-note';

/** The drug-model library: the latest version of each population model, with its source. */
export function DrugModelsScreen() {
  const models = useLibraryModels();
  return (
    <div className="space-y-4">
      <header>
        <h1 className="text-xl font-semibold text-tide-900">Drug models</h1>
        <p className="mt-1 max-w-3xl text-sm text-slate-600">
          The population models the fits and regimen searches use. Each stored version is fixed; an
          edit is a new version, and a course keeps the version it was started with.
        </p>
      </header>
      <Panel title="Library">
        {models.isPending && <Loading what="the drug-model library" />}
        {models.isError && <ErrorMessage error={models.error} what="load the library" />}
        {models.data && models.data.items.length === 0 && (
          <Empty>The library has no model yet.</Empty>
        )}
        {models.data && models.data.items.length > 0 && (
          <table className="w-full text-left text-sm">
            <thead className="border-b border-slate-200 text-xs text-slate-600 [&_th]:py-1 [&_th]:pr-3">
              <tr>
                <th scope="col">Drug</th>
                <th scope="col">Model</th>
                <th scope="col">Version</th>
                <th scope="col">Structure</th>
                <th scope="col">Elimination</th>
                <th scope="col">Source</th>
              </tr>
            </thead>
            <tbody className="[&_td]:py-1.5 [&_td]:pr-3 [&_td]:align-top">
              {models.data.items.map((m) => {
                const d = asDefinition(m.definition);
                return (
                  <tr key={`${m.id}@${m.version}`} className="border-b border-slate-100">
                    <td className="capitalize">{m.drug}</td>
                    <td>
                      <Link
                        className="font-medium text-tide-700 underline"
                        to={paths.drugModel.getHref(m.id)}
                      >
                        {m.name}
                      </Link>
                      <div className="font-mono text-xs text-slate-500">{m.id}</div>
                    </td>
                    <td>v{m.version}</td>
                    <td className="whitespace-nowrap">{structureLabel(d)}</td>
                    <td>{eliminationLabel(d)}</td>
                    <td className="max-w-md text-xs text-slate-700">
                      {m.source}
                      {anyFromMemory(d) && (
                        <div className="mt-0.5 text-amber-900">
                          Some values <FromMemory />
                        </div>
                      )}
                    </td>
                  </tr>
                );
              })}
            </tbody>
          </table>
        )}
      </Panel>
    </div>
  );
}
