// Words for what the operating system says about a file, so no message shows an errno code. Every caller names
// the user's own path beside them (never a temporary name: see targetOfTemp in atomic.ts).

const REASONS: Readonly<Record<string, string>> = {
  ENOENT: 'there is no such file or folder',
  EACCES: 'permission denied',
  EPERM: 'the operation is not permitted',
  EROFS: 'the file system is read-only',
  ENOSPC: 'the disk is full',
  EDQUOT: 'the disk quota is used up',
  EFBIG: 'the file would be larger than the file system allows',
  EISDIR: 'it is a folder',
  ENOTDIR: 'part of the path is not a folder',
  ENAMETOOLONG: 'the name is too long',
  ELOOP: 'it is a loop of symbolic links',
  EEXIST: 'a file of that name already exists',
  ENXIO: 'it is a socket or a device with nothing behind it',
  ETXTBSY: 'the file is in use as a running program',
  EBUSY: 'the file is busy',
  EMFILE: 'too many files are open',
  ENFILE: 'too many files are open on this system',
  EIO: 'the device reported an input/output error',
  EXDEV: 'the file is on another file system than its temporary copy',
  EPIPE: 'the reader closed it',
  EAGAIN: 'the file is not ready to be written without waiting',
  ESPIPE: 'it cannot be read again from the start',
  EINVAL: 'the file system refused the operation',
  ENODEV: 'there is no such device',
};

/** The error's system code when it is a file-system error (code and syscall, as node's fs gives them). */
export function systemCode(e: unknown): string | undefined {
  if (!(e instanceof Error)) return undefined;
  const { code, syscall } = e as NodeJS.ErrnoException;
  return typeof code === 'string' && /^E[A-Z0-9]+$/.test(code) && typeof syscall === 'string' ? code : undefined;
}

/** Plain words for a file-system error: ours, else the system's own description without its code. */
export function reasonOf(e: unknown): string {
  const code = systemCode(e);
  if (code && REASONS[code]) return REASONS[code];
  const own = /^E[A-Z0-9]+: ([^,]+)/.exec((e as Error)?.message ?? '');
  return own ? own[1] : 'the operating system refused it';
}
