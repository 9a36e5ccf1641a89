import { startServer } from './server';

const running = await startServer();
const shutdown = async (signal: string) => {
  console.log(`\n${signal}: stopping the API`);
  await running.stop();
  process.exit(0);
};
process.on('SIGINT', () => void shutdown('SIGINT'));
process.on('SIGTERM', () => void shutdown('SIGTERM'));
