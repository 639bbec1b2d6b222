/**
 * The default number of batch workers: one per CPU, but never more than files, and no more than one
 * per 24 MiB of audio (a worker's start-up compile costs more than a small folder takes).
 */
import { describe, expect, it } from 'vitest';
import { BYTES_PER_DEFAULT_WORKER, defaultJobs } from '../../src/cli/commands/batch.js';

const MiB = 1024 * 1024;

describe('defaultJobs', () => {
  it('starts one worker for a small folder, whatever the CPU count', () => {
    expect(BYTES_PER_DEFAULT_WORKER).toBe(24 * MiB);
    expect(defaultJobs([MiB, MiB], 2)).toBe(1); // two one-minute captures at 8 kHz
    expect(defaultJobs([], 8)).toBe(1);
    expect(defaultJobs([47 * MiB], 8)).toBe(1); // one file: one worker
  });

  it('adds a worker per 24 MiB of audio, up to the CPUs and the files', () => {
    // Six ten-minute files at 8 kHz, 16-bit mono: 6 × 9.6 MB = 57.6 MB → 2 (⌊57.6 MB / 24 MiB⌋ = 2).
    expect(defaultJobs(Array(6).fill(9_600_044), 2)).toBe(2);
    expect(defaultJobs(Array(6).fill(9_600_044), 8)).toBe(2);
    // Six one-hour files at 48 kHz: 6 × 346 MB → all 8 CPUs, but not more than the 6 files.
    expect(defaultJobs(Array(6).fill(345_600_044), 8)).toBe(6);
    expect(defaultJobs(Array(12).fill(345_600_044), 8)).toBe(8);
  });
});
