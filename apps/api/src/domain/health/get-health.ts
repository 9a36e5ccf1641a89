export interface HealthReport {
  status: 'ok' | 'degraded';
  version: string;
  database: { reachable: boolean };
  time: string;
}

/** The health story: the API is up; the database may or may not answer. */
export async function getHealth(deps: {
  version: string;
  isDatabaseReachable: () => Promise<boolean>;
  now?: () => Date;
}): Promise<HealthReport> {
  const reachable = await deps.isDatabaseReachable();
  return {
    status: reachable ? 'ok' : 'degraded',
    version: deps.version,
    database: { reachable },
    time: (deps.now ?? (() => new Date()))().toISOString(),
  };
}
