/**
 * A stand-in for a server busy with uploads, for the kill -9 test: stores generated photos through
 * the same storePhoto() as POST /api/photos, in the DATA_DIR given, until it is killed. Prints one
 * line per stored photo so the test knows uploads are under way.
 */
import path from "node:path";
import sharp from "sharp";
import { databaseFile, openDatabase } from "../../db/connection";
import { storePhoto } from "../../db/queries/photos";
import { LocalStorage } from "../../lib/storage/local";

const [dataDirectory, uploaderId] = process.argv.slice(2);
const db = openDatabase(databaseFile(dataDirectory));
const store = new LocalStorage(path.join(dataDirectory, "objects"));
const limits = { maxBytes: 40 * 1048576, maxPixels: 100e6 };

async function photo(i: number): Promise<Buffer> {
  const raw = Buffer.alloc(96 * 64 * 3);
  for (let p = 0; p < raw.length; p += 3) {
    raw[p] = (i * 37 + p) % 256;
    raw[p + 1] = (i * 11) % 256;
    raw[p + 2] = (p >> 4) % 256;
  }
  return sharp(raw, { raw: { width: 96, height: 64, channels: 3 } }).jpeg({ quality: 90 }).toBuffer();
}

let i = Number(process.env.UPLOAD_LOOP_START ?? 0);
// Several uploads in flight at once, as on a busy bench.
async function worker() {
  for (;;) {
    const bytes = await photo(i++);
    const { photo: row } = await storePhoto(db, store, { bytes, originalName: `loop-${i}.jpg`, uploaderId, limits });
    process.stdout.write(`${row.id}\n`);
  }
}
void Promise.all([worker(), worker(), worker(), worker()]);
