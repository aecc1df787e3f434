import { spawnSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';

// docs/cli.md is generated from the program's own help; this fails when an option changed without
// the reference being regenerated (`node scripts/cli-reference.mjs`). Needs dist/ (npm run build).
describe('docs/cli.md', () => {
  it('matches the help texts of the built program', () => {
    const r = spawnSync(process.execPath, ['scripts/cli-reference.mjs', '--check'], { encoding: 'utf8' });
    expect(r.stderr).toBe('');
    expect(r.status).toBe(0);
  });
});
