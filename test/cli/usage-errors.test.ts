import { beforeAll, describe, expect, it } from 'vitest';
import { STACK_FRAME, requireBuild, runCli } from './fixtures/run-cli.js';

// Usage mistakes caught by the option parser get the same one-message style as bad values
// (field, value, what is accepted) and exit code 2 (common practice for usage errors).
beforeAll(() => requireBuild());

describe('usage errors from the option parser', () => {
  it.each([
    [['assess', '--frobnicate'], /^elastimate: option: got "--frobnicate"; unknown.*; accepted: an option listed by --help$/],
    [['record', 'show'], /^elastimate: file: missing; accepted: /],
    [['record', 'show', 'a', 'b'], /^elastimate: arguments: got 2; accepted: 1 for show/],
    [['assess', '--sbp'], /^elastimate: --sbp <values>: missing value; accepted: /],
    [['frobnicate'], /^elastimate: command: got "frobnicate"; accepted: assess, demo, record, export, batch, sr-cohort, report/],
  ])('%j → one message, exit 2', async (args, pattern) => {
    const run = await runCli(args as string[]);
    expect(run.code).toBe(2);
    expect(run.stderr.trim().split('\n')).toHaveLength(1);
    expect(run.stderr.trim()).toMatch(pattern);
    expect(run.stderr).not.toMatch(STACK_FRAME);
    expect(run.stdout).toBe('');
  });
});
