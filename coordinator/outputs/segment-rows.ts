// The size of a field segment, in its own module so that the dispatchers can count rows without loading the
// Parquet writers (DuckDB) before a segment is due.

/** Field rows per segment file (a Loamwave choice: about 3 MB of ZSTD Parquet, some 15 MB of result text). */
export const SEGMENT_ROWS = 50_000;
