import type { Drug, DrugModel, DrugModelListQuery } from '@ebbtide/contracts';
import { fetchPage, iso, type Conn } from './casework-db';

interface DrugModelRow {
  id: string;
  version: number;
  drug: Drug;
  name: string;
  source: string;
  definition: Record<string, unknown>;
  plausible_dose_min_mg: number;
  plausible_dose_max_mg: number;
  created_by: string | null;
  created_at: Date;
}

const toRecord = (r: DrugModelRow): DrugModel => ({
  id: r.id,
  version: r.version,
  drug: r.drug,
  name: r.name,
  source: r.source,
  definition: r.definition,
  plausibleSingleDoseMg: { min: r.plausible_dose_min_mg, max: r.plausible_dose_max_mg },
  createdAt: iso(r.created_at) as string,
  createdBy: r.created_by,
});

export interface DrugModelInsert {
  id: string;
  version: number;
  drug: Drug;
  name: string;
  source: string;
  definition: Record<string, unknown>;
  plausibleSingleDoseMg: { min: number; max: number };
  createdBy: string | null;
}

export async function insertDrugModel(conn: Conn, m: DrugModelInsert): Promise<DrugModel> {
  const [row] = (await conn('drug_models')
    .insert({
      id: m.id,
      version: m.version,
      drug: m.drug,
      name: m.name,
      source: m.source,
      definition: JSON.stringify(m.definition),
      plausible_dose_min_mg: m.plausibleSingleDoseMg.min,
      plausible_dose_max_mg: m.plausibleSingleDoseMg.max,
      created_by: m.createdBy,
    })
    .returning('*')) as DrugModelRow[];
  return toRecord(row as DrugModelRow);
}

/** The given version, or the latest one when `version` is omitted. */
export async function findDrugModel(
  conn: Conn,
  id: string,
  version?: number,
): Promise<DrugModel | undefined> {
  const q = conn('drug_models').where({ id });
  if (version !== undefined) q.where({ version });
  const row = (await q.orderBy('version', 'desc').first()) as DrugModelRow | undefined;
  return row ? toRecord(row) : undefined;
}

export async function latestDrugModelVersion(conn: Conn, id: string): Promise<number> {
  const row = (await conn('drug_models').where({ id }).max({ v: 'version' }).first()) as
    { v: number | null } | undefined;
  return row?.v ?? 0;
}

export async function listDrugModels(
  conn: Conn,
  query: DrugModelListQuery,
): Promise<{ items: DrugModel[]; total: number }> {
  const q = conn('drug_models').select('drug_models.*');
  if (query.drug) q.where('drug', query.drug);
  if (query.allVersions !== 'true') {
    q.whereRaw(
      'version = (select max(d2.version) from drug_models d2 where d2.id = drug_models.id)',
    );
  }
  const column = query.sort === 'id' ? 'id' : query.sort === 'drug' ? 'drug' : 'created_at';
  const { rows, total } = await fetchPage<DrugModelRow>(q, query, [
    { column },
    { column: 'id' },
    { column: 'version' },
  ]);
  return { items: rows.map(toRecord), total };
}
