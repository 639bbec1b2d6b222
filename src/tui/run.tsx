/**
 * Starts the interactive app on the given streams and resolves with the exit code when the person
 * leaves. Loaded lazily by `keyform ui`, so scripted runs never load React or Ink.
 */
import { render } from 'ink';
import { App } from './App.js';
import { realServices, type Services } from './services.js';
import { colorAllowed } from './theme.js';
import { stopWorkers } from './off-thread.js';

export interface StartOptions {
  target?: string;
  stdout: NodeJS.WriteStream;
  stdin: NodeJS.ReadStream;
  stderr: NodeJS.WriteStream;
  env: Record<string, string | undefined>;
  services?: Services;
}

export async function startApp(options: StartOptions): Promise<number> {
  const theme = { color: colorAllowed(options.env, options.stdout.isTTY) };
  // Alternate screen: the terminal's own contents come back untouched when the app closes.
  const alt = Boolean(options.stdout.isTTY);
  if (alt) options.stdout.write('\u001b[?1049h\u001b[H');
  const instance = render(<App services={options.services ?? realServices()} theme={theme} target={options.target} />, {
    stdout: options.stdout,
    stdin: options.stdin,
    stderr: options.stderr,
    exitOnCtrlC: false,
    patchConsole: false,
  });
  try {
    await instance.waitUntilExit();
  } finally {
    instance.cleanup();
    if (options.stdin.isTTY) options.stdin.setRawMode?.(false);
    await stopWorkers();
    if (alt) options.stdout.write('\u001b[?1049l');
  }
  return 0;
}
