/** Entry point (`npm start`): start from the environment, log the URL, close cleanly on a signal. */
import { ConfigError } from './config.js';
import { startService } from './start.js';
import { StoreUnavailableError } from './store-failures.js';

/** Longest wait for answers in flight after SIGTERM or SIGINT, ms. Our choice. */
const SHUTDOWN_GRACE_MS = 1_000;

async function main(): Promise<void> {
  try {
    const { app, url } = await startService(process.env);
    app.log.info(`Arcline is serving on ${url}`);
    const stop = (signal: string): void => {
      app.log.info(`${signal}: closing`);
      // Closing waits for answers in flight; never longer than this, whatever is running.
      setTimeout(() => process.exit(1), SHUTDOWN_GRACE_MS).unref();
      app.close().then(
        () => process.exit(0),
        () => process.exit(1),
      );
    };
    process.once('SIGINT', () => stop('SIGINT'));
    process.once('SIGTERM', () => stop('SIGTERM'));
  } catch (error) {
    if (error instanceof ConfigError) {
      console.error(`arcline: configuration error: ${error.message}`);
    } else if (error instanceof StoreUnavailableError) {
      console.error(`arcline: cannot open the store: ${error.message}`);
    } else {
      const code = (error as NodeJS.ErrnoException | null)?.code;
      if (code === 'EADDRINUSE') console.error('arcline: the port is already in use; set PORT to a free one.');
      else if (code === 'EACCES') console.error('arcline: no permission to listen on that port or to write DATA_DIR.');
      else console.error('arcline: could not start:', error);
    }
    process.exit(1);
  }
}

void main();
