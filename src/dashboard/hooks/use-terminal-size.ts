/** The terminal's columns and rows, following resizes; fixed values (tests, fixed layouts) win. */
import { useStdout } from 'ink';
import { useEffect, useState } from 'react';

export interface TerminalSize {
  readonly columns: number;
  readonly rows: number;
}

export function useTerminalSize(fixed: Partial<TerminalSize> = {}): TerminalSize {
  const { stdout } = useStdout();
  const read = (): TerminalSize => ({
    columns: fixed.columns ?? (stdout.columns > 0 ? stdout.columns : 80),
    rows: fixed.rows ?? (stdout.rows > 0 ? stdout.rows : 24),
  });
  const [size, setSize] = useState<TerminalSize>(read);
  useEffect(() => {
    const onResize = (): void => setSize(read());
    onResize();
    stdout.on('resize', onResize);
    return () => {
      stdout.off('resize', onResize);
    };
  }, [stdout, fixed.columns, fixed.rows]);
  return size;
}
