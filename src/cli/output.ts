/** Whether to colour terminal output: only on a TTY, never when NO_COLOR is set (https://no-color.org). */
export function useColor(stream: NodeJS.WriteStream): boolean {
  return !!stream.isTTY && !('NO_COLOR' in process.env && process.env.NO_COLOR !== '');
}

/** One clear line for a user mistake. */
export function problemLine(file: string, message: string): string {
  return message.startsWith(file) || !file ? `error: ${message}` : `error: ${file}: ${message}`;
}
