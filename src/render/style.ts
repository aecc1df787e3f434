/**
 * Emphasis for terminal text. The renderer receives a Style; the CLI decides
 * whether it is coloured (a terminal, NO_COLOR unset) or plain.
 */
export interface Style {
  heading(text: string): string;
  strong(text: string): string;
  dim(text: string): string;
  caution(text: string): string;
  attention(text: string): string;
  /** Columns to wrap prose to: the terminal's width, or 80 off a terminal. */
  width: number;
}

/** Prose width off a terminal (a file, a pipe): 80 columns. */
export const DEFAULT_WIDTH = 80;

/** The width to wrap to for a stream: its columns on a terminal (at least 40), else 80. */
export function screenWidth(stream: { isTTY?: boolean; columns?: number }): number {
  return stream.isTTY && typeof stream.columns === 'number' && stream.columns > 0 ? Math.max(40, stream.columns) : DEFAULT_WIDTH;
}

export const plainStyle: Style = {
  heading: (t) => t,
  strong: (t) => t,
  dim: (t) => t,
  caution: (t) => t,
  attention: (t) => t,
  width: DEFAULT_WIDTH,
};

/** Whether a stream should get colour: a terminal, NO_COLOR unset, TERM not dumb. */
export function wantsColour(stream: { isTTY?: boolean }, env: NodeJS.ProcessEnv): boolean {
  // no-color.org: a present, non-empty NO_COLOR turns colour off.
  if (env.NO_COLOR !== undefined && env.NO_COLOR !== '') return false;
  if (env.FORCE_COLOR !== undefined && env.FORCE_COLOR !== '0') return true;
  return Boolean(stream.isTTY) && env.TERM !== 'dumb';
}

/** chalk is loaded only when colour is wanted. */
export async function colourStyle(width = DEFAULT_WIDTH): Promise<Style> {
  const { Chalk } = await import('chalk');
  const c = new Chalk({ level: 1 });
  return {
    heading: (t) => c.bold.underline(t),
    strong: (t) => c.bold(t),
    dim: (t) => c.dim(t),
    caution: (t) => c.yellow(t),
    attention: (t) => c.bold.magenta(t),
    width,
  };
}
