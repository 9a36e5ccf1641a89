import { startIdp } from './server';

const running = await startIdp();
const shutdown = (signal: string) => {
  console.log(`\n${signal}: stopping the identity provider`);
  void running.stop().then(() => process.exit(0));
};
process.on('SIGINT', () => shutdown('SIGINT'));
process.on('SIGTERM', () => shutdown('SIGTERM'));
