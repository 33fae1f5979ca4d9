/**
 * Test helpers for the ingest tests: a fresh temporary folder, a file written
 * under it (folders made on the way), and the UsageError a promise rejects with.
 */
import { mkdirSync, mkdtempSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { expect } from 'vitest';
import { UsageError } from '../../src/util/errors.js';

/** A new empty folder under the system's temporary folder. */
export function tmp(prefix = 'sheaf-ingest-'): string {
  return mkdtempSync(path.join(os.tmpdir(), prefix));
}

/** Writes `content` at `root/rel`, making the folders on the way. */
export function put(root: string, rel: string, content: string | Uint8Array): void {
  const p = path.join(root, rel);
  mkdirSync(path.dirname(p), { recursive: true });
  writeFileSync(p, content);
}

/** The UsageError `p` rejects with; fails the test when it resolves or rejects with anything else. */
export async function usage(p: Promise<unknown>): Promise<UsageError> {
  try {
    await p;
  } catch (err) {
    expect(err).toBeInstanceOf(UsageError);
    return err as UsageError;
  }
  throw new Error('expected a UsageError');
}
