// Writes a copy of a Stryker configuration with some settings changed, for runs that must not share a sandbox,
// incremental file or report with another (scripts/mutation-per-file.sh, scripts/mutation-changed.sh).
// Usage: node scripts/stryker-config-copy.mjs <configuration> <copy> '<JSON of the settings to change>'
// A changed "vitest" object is merged into the configuration's own; every other setting is replaced.
import fs from 'node:fs';

const [from, to, changes] = process.argv.slice(2);
const config = JSON.parse(fs.readFileSync(from, 'utf8'));
const { vitest, ...rest } = JSON.parse(changes ?? '{}');
Object.assign(config, rest);
if (vitest) config.vitest = { ...config.vitest, ...vitest };
fs.writeFileSync(to, JSON.stringify(config, null, 2));
