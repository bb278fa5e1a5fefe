// Package catalog reads star catalogues into Stars, the struct-of-arrays form
// the per-star transform consumes, and builds the synthetic sky used when no
// catalogue is given.
//
// Frames and units: positions are ICRS unit vectors from the Sun at the
// catalogue epoch (Stars.Epoch: 2000.0 for BSC5 and generic tables, 1991.25
// for both Hipparcos reductions, 2016.0 for Gaia DR3) unless ReadOptions.Epoch
// asks for propagation by proper motion (linear model, documented on
// ReadOptions.Epoch); distances are parsecs from the Sun, +Inf when the
// catalogue gives no usable parallax (such stars are treated as infinitely
// far and carry FlagNoDistance); magnitudes are Johnson V; temperatures are
// kelvin; proper motions are mas/yr with μα including cos δ; radial
// velocities km/s.
//
// # Readers
//
// Open and Read detect the format from the content — gzip magic (the stream
// is inflated transparently and sniffed again), the cache magic "SKYFCAT",
// hip_main.dat's leading "H|", a delimited header (Gaia when it names
// source_id and phot_g_mean_mag), the fixed-width layouts of hip2.dat and
// of the Bright Star Catalogue — and use the file extension (.csv, .tsv)
// only when the content decides nothing. ReadOptions.Format overrides.
// Supported: BSC5 (CDS V/50), Hipparcos (CDS I/239 hip_main.dat), Hipparcos
// new reduction (CDS I/311 hip2.dat), Gaia archive CSV, any CSV/TSV with a
// header through a ColumnMap, the package's binary cache, and Apache
// Parquet (magic "PAR1": Gaia or ColumnMap tables through the same per-row
// rules as CSV, or the exact Stars layout of WriteParquet; see parquet.go).
// OpenChunks reads a cache in row chunks for catalogues larger than memory.
//
// ECSV (Astropy APE 6, version 1.0), the layout of the Gaia archive's bulk
// gaia_source files, is read as a delimited table: the "# %ECSV" line and
// the YAML header in "# " lines (only its delimiter key matters: a comma,
// or a space by default), then the column names and the rows, "null" for a
// missing value, quoted text (the "Gaia DR3 n" designations) kept whole.
// The column names decide Gaia or generic, however long the YAML header.
//
// # Many files
//
// ExpandInputs turns arguments — files, directories (their files, by
// name), glob patterns (matches by name) — into a list of files; a pattern
// or directory naming no file is an error (ErrNoMatch). OpenFiles reads the
// list as one catalogue, in list order whatever its worker count (files are
// read in parallel, each decompressed and parsed on one goroutine, so many
// gzipped shards use every core), refusing a file whose format differs
// from the others' (ErrMixedFormats) and naming the file and line of any
// bad row. ReadOptions.MaxV cuts stars fainter than a V while each file is
// read. Readers parse every field of a row only to count fields; numbers
// are parsed only in the columns the reader uses.
//
// Each read returns a Report: format, lines, rows kept, rows skipped by
// reason with the line of the first one, declared row count, V, B−V and
// distance ranges, and counts of flags.
//
// Bad input: a row lacking a required value (position, magnitude) is
// skipped and counted, never dropped silently. Everything else fails the
// file with a *ParseError ("catalog: file:line: field X: value "v":
// reason") wrapping a sentinel (ErrNotNumber, ErrNotFinite, ErrOutOfRange,
// ErrFieldCount, ErrMissingColumn, ErrLineTooLong, ErrTruncated, ErrCorrupt,
// ErrDecompressedTooLarge, ErrTooManyRows, ErrUnknownFormat, ErrNoRows).
// Limits on hostile input (ReadOptions): line length (1 MiB), rows (10⁸,
// also applied to a declared "# rows: N" before any allocation), inflated
// size (32 GiB) and inflation ratio (100× after the first 8 MiB).
//
// # Colours and magnitudes
//
// Teff comes from the catalogue when it has one (FlagTeffFromCatalogue),
// else from B−V by Ballesteros (2012) or from Gaia BP−RP by Mucciarelli &
// Bellazzini (2020) (FlagTeffExtrapolated outside their ranges), else it
// is DefaultTeff (FlagNoColour); see teff.go. Gaia G → V uses Riello et al.
// (2021); Hipparcos Hp → V (I/311 only, which has no V) uses the Bessell
// (2000) table.
//
// # Cache, look-up, download
//
// WriteCache/ReadCache store Stars in a versioned, CRC-32C-checksummed,
// little-endian column format (layout in cache.go) that loads at memory
// speed. Stars in canonical order — by catalogue V, ties in input order
// (SortByV, a stable sort) — are written as a sorted cache (version 2,
// layout in sorted.go) with a magnitude index: the first row of every
// 0.05-mag bin, bounds of Teff and of each bin's distances, and a CRC-32C
// per bin and column. ChunkReader.LimitBins reads only the leading bins
// (the stars that can reach a frame's limit, render.DepthBins); each bin
// read is checked against its CRCs, and the V, Teff and distance columns
// of the bins skipped are checked against the index, so a cache whose
// index disagrees with its rows is refused as corrupt (ErrCorrupt). Stars.Find looks stars up by number, "HR n"/"HIP n"/"Gaia DR3 n",
// or name. Fetch downloads a catalogue (KnownSources: CDS V/50, I/239,
// I/311) to a temporary file, verifies it by reading it, and renames it
// into place in CacheDir().
//
// # Unresolved light
//
// NewUnresolvedSky maps the light of the synthetic sky's stars fainter than
// a resolved depth V: the same galaxy model as Synthetic, integrated along
// each line of sight (with its dust) into a few diluted blackbodies of fixed
// temperatures per direction, I_λ(n) = Σ_k W_k(n) B_λ(T_k), on a grid in
// galactic coordinates read by bilinear interpolation. Resolved stars plus
// the map are the whole model sky, whatever the depth. The V-band
// normalisation of W is passed in (the package has no photometry).
//
// The package sits at the start of the pipeline and imports no other
// skyframe package.
package catalog
