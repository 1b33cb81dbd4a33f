/** Which level of which study an external run belongs to, for messages ("study 'tile' level 3 (n = 16)"). */
export interface LevelRef {
  study?: string;
  /** 0-based level index (shown 1-based). */
  index: number;
  n?: number;
}

/** "study 'tile' level 3 (n = 16)"; levels are counted from 1 for people. */
export function levelLabel(ref: LevelRef | undefined): string {
  if (!ref) return '';
  const study = ref.study ? `study '${ref.study}' ` : '';
  const n = ref.n !== undefined ? ` (n = ${ref.n})` : '';
  return `${study}level ${ref.index + 1}${n}`;
}

/** The place a message is about: "study 'tile' level 3: out/solution.vtk line 12". */
export function placeOf(ref: LevelRef | undefined, file: string, line?: number): string {
  const label = levelLabel(ref);
  const at = line !== undefined ? `${file} line ${line}` : file;
  return label ? `${label}: ${at}` : at;
}

/** 1-based line number of a character offset in a text. */
export function lineAt(text: string, offset: number): number {
  let line = 1;
  const end = Math.min(offset, text.length);
  for (let i = 0; i < end; i++) if (text.charCodeAt(i) === 10) line++;
  return line;
}
