/**
 * The one development password of the seeded demo accounts in accounts.dev.json (stored there
 * only as scrypt hashes). Printed by scripts/start.sh; used by the tests. Never valid in
 * production: the provider refuses to start there with the demo accounts file.
 */
export const DEMO_PASSWORD = 'kestrel-bay-demo-2026';
