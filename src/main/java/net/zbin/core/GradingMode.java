package net.zbin.core;

/**
 * NESTED: windows each containing the previous one, tightest first; the first that contains the
 * part wins. SEQUENTIAL: contiguous, non-overlapping windows, ascending; the one it falls in wins.
 */
public enum GradingMode { NESTED, SEQUENTIAL }
