import readline from 'node:readline';

/** Reads a line from a terminal without echoing it. */
async function promptHidden(question: string): Promise<string> {
  const rl = readline.createInterface({ input: process.stdin, output: process.stdout, terminal: true });
  process.stdout.write(question);
  // Swallow readline's echo of what is typed (a documented-by-use hook of node:readline).
  (rl as unknown as { _writeToOutput: (s: string) => void })._writeToOutput = () => {};
  const answer = await new Promise<string>((resolve) => rl.question('', resolve));
  rl.close();
  process.stdout.write('\n');
  return answer;
}

/** The first line piped to standard input, without its line ending. */
async function firstLineOfStdin(): Promise<string> {
  let text = '';
  for await (const chunk of process.stdin) {
    text += String(chunk);
    if (text.includes('\n')) break;
  }
  return text.split(/\r?\n/)[0] ?? '';
}

/**
 * A secret for an operations command, never from the command line (process lists and shell history keep it):
 * the named environment variable, else a hidden prompt typed twice on a terminal, else the first line of stdin.
 */
export async function readSecret(envName: string, label: string): Promise<string> {
  const fromEnv = process.env[envName];
  if (fromEnv) return fromEnv;
  if (!process.stdin.isTTY) return firstLineOfStdin();
  const first = await promptHidden(`${label}: `);
  const again = await promptHidden(`${label} again: `);
  if (first !== again) throw new Error('the two entries differ');
  return first;
}
