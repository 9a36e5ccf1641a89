/**
 * Seeds the invented Kestrel Bay demo data into DATABASE_URL. Idempotent.
 * Demo data is for the demo only; tests create their own rows.
 */
const seeders: Array<{ name: string; run: () => Promise<void> }> = [
  {
    name: 'Kestrel Bay patients',
    run: async () => {
      await (await import('./seed/kestrel-bay')).kestrelBaySeeder.run();
    },
  },
  {
    name: 'teaching cases',
    run: async () => (await import('./seed/teaching-cases')).teachingCasesSeeder.run(),
  },
];

async function main(): Promise<void> {
  if (seeders.length === 0) {
    console.log('demo data: nothing to seed yet');
    return;
  }
  for (const seeder of seeders) {
    await seeder.run();
    console.log(`seeded ${seeder.name}`);
  }
}

main().catch((error: unknown) => {
  console.error(error instanceof Error ? error.message : error);
  process.exit(1);
});
