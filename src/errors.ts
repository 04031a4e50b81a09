/**
 * Typed errors. Anything a user can fix (bad flag, bad rate, unreadable file, invalid workpaper)
 * is a {@link TolrateInputError}: the CLI prints its message and exits 2, never a stack trace.
 */

/** Base class for every error caused by input the user can correct. */
export class TolrateInputError extends Error {
  /** Machine-readable code, stable across versions (e.g. 'INVALID_RATE'). */
  readonly code: string;
  /** Optional extra lines shown under the message (a hint, a list of problems). */
  readonly details: string[];
  constructor(message: string, code = 'INVALID_INPUT', details: string[] = []) {
    super(message);
    this.name = 'TolrateInputError';
    this.code = code;
    this.details = details;
  }
}

/** A parameter of a statistical function is out of range or of the wrong kind. */
export class SamplingInputError extends TolrateInputError {
  /** The name of the offending parameter, as the library API spells it. */
  readonly parameter: string;
  constructor(parameter: string, message: string, code = 'INVALID_PARAMETER') {
    super(message, code);
    this.name = 'SamplingInputError';
    this.parameter = parameter;
  }
}

/** No sample size (or extension) within the practical cap achieves the planned risk. */
export class NoPracticalSizeError extends TolrateInputError {
  constructor(message: string) {
    super(message, 'NO_PRACTICAL_SIZE');
    this.name = 'NoPracticalSizeError';
  }
}

/** Wrong command-line usage: unknown command or flag, missing or malformed value. */
export class UsageError extends TolrateInputError {
  constructor(message: string, details: string[] = []) {
    super(message, 'USAGE', details);
    this.name = 'UsageError';
  }
}

/** A file could not be read or does not have the expected content. */
export class FileInputError extends TolrateInputError {
  readonly path: string;
  constructor(path: string, message: string, details: string[] = []) {
    super(message, 'FILE', details);
    this.name = 'FileInputError';
    this.path = path;
  }
}

export function isInputError(e: unknown): e is TolrateInputError {
  return e instanceof TolrateInputError;
}

/**
 * The file system refused a write or a read (disk full, no permission, read-only disk, a folder
 * where a file was expected...). The message says what happened and what to do; `errno` is the
 * system's code (ENOSPC, EACCES, ...). Nothing on disk was changed when a write fails.
 */
export class FileSystemError extends TolrateInputError {
  readonly path: string;
  readonly errno: string;
  constructor(path: string, errno: string, message: string, details: string[] = []) {
    super(message, 'FILE_SYSTEM', details);
    this.name = 'FileSystemError';
    this.path = path;
    this.errno = errno;
  }
}

/** Another session holds the workpaper's lock (the message names who). */
export class WorkpaperLockedError extends TolrateInputError {
  readonly path: string;
  constructor(path: string, message: string, details: string[] = []) {
    super(message, 'LOCKED', details);
    this.name = 'WorkpaperLockedError';
    this.path = path;
  }
}

/** The workpaper on disk is not the one the session loaded (another session or an edit changed it). */
export class WorkpaperChangedError extends TolrateInputError {
  readonly path: string;
  constructor(path: string, message: string, details: string[] = []) {
    super(message, 'CHANGED_ON_DISK', details);
    this.name = 'WorkpaperChangedError';
    this.path = path;
  }
}
