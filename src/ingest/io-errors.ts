/**
 * One-line reasons for files that cannot be read.
 *
 * @module
 */

/** `unreadable: permission denied (EACCES)` and the like, from a file system error. */
export function unreadableReason(err: unknown): string {
  const code = (err as { code?: unknown } | null)?.code;
  switch (code) {
    case 'EACCES':
    case 'EPERM':
      return `unreadable: permission denied (${code})`;
    case 'ENOENT':
      return 'unreadable: missing, or a link to nothing (ENOENT)';
    case 'ELOOP':
      return 'unreadable: too many levels of links (ELOOP)';
    case 'EISDIR':
      return 'unreadable: a folder (EISDIR)';
    case 'ERR_FS_FILE_TOO_LARGE':
      return 'unreadable: larger than 2 GiB (ERR_FS_FILE_TOO_LARGE)';
    default:
      return typeof code === 'string' ? `unreadable: ${code}` : `unreadable: ${err instanceof Error ? err.message : String(err)}`;
  }
}

/** True for errors that come from the file system (they carry a string `code` and a `syscall`). */
export function isFsError(err: unknown): boolean {
  const e = err as { code?: unknown; syscall?: unknown } | null;
  return typeof e?.code === 'string' && (typeof e.syscall === 'string' || e.code === 'ERR_FS_FILE_TOO_LARGE');
}

/** The first line of an error's message, white space folded and a final full stop dropped (`unknown error` when empty): a reader's skip reason. */
export function oneLine(err: unknown): string {
  const msg = err instanceof Error ? err.message : String(err);
  return (msg.split('\n')[0] as string).replace(/\s+/g, ' ').trim().replace(/\.$/, '') || 'unknown error';
}
