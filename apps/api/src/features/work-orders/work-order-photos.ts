import { randomBytes } from 'node:crypto';
import { readFile } from 'node:fs/promises';
import { join } from 'node:path';
import type { Database } from '@tierscope/db';
import { fileTypeFromBuffer } from 'file-type';
import sharp from 'sharp';
import { AppError, notFound } from '../../platform/errors';
import { recordAudit } from '../audit/audit.repository';
import { findPhotoContent, insertPhoto, insertPhotoContent } from './work-orders.repository';

/** Photo types accepted, judged by the file's content (its magic bytes), never by its name. */
const PHOTO_TYPES: Record<string, string> = {
  'image/jpeg': 'jpg',
  'image/png': 'png',
  'image/webp': 'webp',
};

/** Photos are kept at most this wide or high: enough to read a label or a gauge, far less to store. */
const PHOTO_MAX_SIDE = 2560;
/** A decompression bomb (a small file of huge dimensions) is refused before it is decoded. */
const PHOTO_MAX_PIXELS = 50_000_000;

export interface UploadedPhoto {
  originalName: string;
  buffer: Buffer;
}

export interface ReadPhoto {
  file: UploadedPhoto;
  mime: string;
  extension: string;
  /** the image as it is stored: decoded and encoded again */
  image: Buffer;
}

/**
 * Decodes the whole image (sharp/libvips, failing on a file cut short) and encodes it again in its own
 * format: what is stored is only pixels that could be read (anything appended to the file, and the EXIF
 * data with its location, are gone), turned upright and no larger than PHOTO_MAX_SIDE. Null when unreadable.
 */
async function reencode(buffer: Buffer, mime: string): Promise<Buffer | null> {
  try {
    const image = sharp(buffer, { failOn: 'truncated', limitInputPixels: PHOTO_MAX_PIXELS })
      .rotate()
      .resize({
        width: PHOTO_MAX_SIDE,
        height: PHOTO_MAX_SIDE,
        fit: 'inside',
        withoutEnlargement: true,
      });
    if (mime === 'image/png') return await image.png().toBuffer();
    if (mime === 'image/webp') return await image.webp({ quality: 85 }).toBuffer();
    return await image.jpeg({ quality: 85, mozjpeg: true }).toBuffer();
  } catch {
    // libvips could not decode it: cut short, damaged, or not the image its first bytes claim.
    return null;
  }
}

/** Every uploaded photo checked by content and decoded whole, or one 400 naming each file refused. */
export async function readPhotos(files: UploadedPhoto[]): Promise<ReadPhoto[]> {
  const typed = await Promise.all(
    files.map(async (file) => ({ file, mime: (await fileTypeFromBuffer(file.buffer))?.mime })),
  );
  const wrongType = typed.filter((t) => !t.mime || !(t.mime in PHOTO_TYPES));
  if (wrongType.length > 0) {
    throw new AppError(
      'validation_failed',
      'Only photos (JPEG, PNG or WebP) can be attached',
      wrongType.map((b) => ({
        path: 'photos',
        message: `${b.file.originalName} is not a JPEG, PNG or WebP image`,
      })),
    );
  }
  const read = await Promise.all(
    typed.map(async ({ file, mime = '' }) => ({
      file,
      mime,
      extension: PHOTO_TYPES[mime] ?? 'bin',
      image: await reencode(file.buffer, mime),
    })),
  );
  const unreadable = read.filter((r) => !r.image);
  if (unreadable.length > 0) {
    throw new AppError(
      'validation_failed',
      'A photo could not be read: it may be cut short or damaged',
      unreadable.map((r) => ({
        path: 'photos',
        message: `${r.file.originalName} is not a whole, readable image`,
      })),
    );
  }
  return read.flatMap((r) => (r.image ? [{ ...r, image: r.image }] : []));
}

/**
 * Keeps checked photos of a work order, bytes and record together in one transaction (so any API process
 * serves them), with one audit entry.
 */
export async function storePhotos(
  db: Database,
  order: { id: number; farmId: number },
  userId: number,
  photos: readonly ReadPhoto[],
): Promise<void> {
  await db.transaction(async (tx) => {
    for (const { file, mime, extension, image } of photos) {
      const photo = await insertPhoto(tx, {
        workOrderId: order.id,
        farmId: order.farmId,
        storedName: `${randomBytes(16).toString('hex')}.${extension}`,
        originalName: file.originalName,
        contentType: mime,
        bytes: image.length,
        uploadedBy: userId,
      });
      await insertPhotoContent(tx, photo.id, image);
    }
    await recordAudit(tx, {
      farmId: order.farmId,
      actorUserId: userId,
      action: 'workOrder.photos',
      entity: 'work_order',
      entityId: order.id,
      after: { added: photos.length },
    });
  });
}

/**
 * A kept photo's bytes: from the database, or — for photos from before their bytes were kept there — from
 * the data folder.
 */
export async function photoBytes(
  db: Database,
  photosDir: string,
  photo: { id: number; farmId: number; storedName: string },
): Promise<Buffer> {
  return (
    (await findPhotoContent(db, photo.id)) ??
    (await readFile(join(photosDir, String(photo.farmId), photo.storedName)).catch(() => {
      // The record outlived its file (a restored database, a cleaned folder): say so plainly.
      throw notFound('Photo file');
    }))
  );
}
