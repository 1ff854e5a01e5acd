// Zip archives for tests, read with yauzl and written with yazl (general-purpose zip libraries, outside the
// project's own reader): every entry into memory, one entry, the central directory's records, and a zip
// made from names and bytes with a fixed modification time, so its bytes never depend on the clock.
import { writeFileSync } from 'node:fs';
import yauzl from 'yauzl';
import yazl from 'yazl';

/** The modification time written into every entry (2026-11-01 UTC). */
export const ZIP_MTIME = new Date(Date.UTC(2026, 10, 1));

function eachEntry(
  path: string,
  onEntry: (zip: yauzl.ZipFile, entry: yauzl.Entry, next: () => void, fail: (e: unknown) => void) => void,
): Promise<void> {
  return new Promise((ok, fail) => {
    yauzl.open(path, { lazyEntries: true }, (err, zip) => {
      if (err || !zip) return fail(err ?? new Error(`cannot open ${path}`));
      zip.on('entry', (e: yauzl.Entry) => onEntry(zip, e, () => zip.readEntry(), fail));
      zip.on('end', () => ok());
      zip.on('error', fail);
      zip.readEntry();
    });
  });
}

/** Every entry of a zip whose name `keep` accepts (all by default): name -> bytes, in archive order. */
export async function readZip(path: string, keep: (name: string) => boolean = () => true): Promise<Map<string, Buffer>> {
  const out = new Map<string, Buffer>();
  await eachEntry(path, (zip, e, next, fail) => {
    if (!keep(e.fileName)) return next();
    zip.openReadStream(e, (err, s) => {
      if (err || !s) return fail(err);
      const parts: Buffer[] = [];
      s.on('data', (d: Buffer) => parts.push(d));
      s.on('end', () => {
        out.set(e.fileName, Buffer.concat(parts));
        next();
      });
      s.on('error', fail);
    });
  });
  return out;
}

/** The bytes of one entry; rejects when the zip has none of that name. */
export async function readZipEntry(path: string, name: string): Promise<Buffer> {
  const got = (await readZip(path, (n) => n === name)).get(name);
  if (!got) throw new Error(`${name} not in ${path}`);
  return got;
}

export interface ZipRecord {
  crc32: number;
  compressedSize: number;
  uncompressedSize: number;
}

/** What the central directory says of each entry (as the zip's writer recorded it), bodies unread. */
export async function zipDirectory(path: string): Promise<Map<string, ZipRecord>> {
  const out = new Map<string, ZipRecord>();
  await eachEntry(path, (_zip, e, next) => {
    out.set(e.fileName, { crc32: e.crc32, compressedSize: e.compressedSize, uncompressedSize: e.uncompressedSize });
    next();
  });
  return out;
}

export type ZipFiles = Iterable<readonly [string, Buffer | string]> | Record<string, Buffer | string>;

/** A zip of the entries (text is written as UTF-8), in the order given; compress false stores them. */
export async function zipBytes(files: ZipFiles, { compress = true }: { compress?: boolean } = {}): Promise<Buffer> {
  const zip = new yazl.ZipFile();
  const list = Symbol.iterator in files ? files : Object.entries(files);
  for (const [name, body] of list as Iterable<readonly [string, Buffer | string]>) {
    zip.addBuffer(Buffer.isBuffer(body) ? body : Buffer.from(body, 'utf8'), name, { mtime: ZIP_MTIME, compress });
  }
  zip.end();
  const chunks: Buffer[] = [];
  for await (const c of zip.outputStream) chunks.push(c as Buffer);
  return Buffer.concat(chunks);
}

/** Writes zipBytes(files) to path. */
export async function writeZip(path: string, files: ZipFiles, options: { compress?: boolean } = {}): Promise<void> {
  writeFileSync(path, await zipBytes(files, options));
}
