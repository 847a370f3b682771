/**
 * What an upload really is, and the bytes we keep of it.
 *
 * The type comes from the content (file-type's signatures), never from the name or the declared
 * type: JPEG, PNG, WebP and GIF images and PDF documents are taken; anything else (SVG, HTML, XML,
 * text, archives, executables) is refused. Images are checked against the pixel limit from their
 * header before anything is decoded (a small file declaring 50 000 × 50 000 is refused unread),
 * decoded with the same limit, turned upright by their orientation tag and re-encoded in their own
 * format without metadata (EXIF with GPS position, XMP, IPTC, comments); a thumbnail of at most
 * 320 px goes beside them. GIFs keep their first frame only. PDFs are stored as sent.
 */
import { fileTypeFromBuffer } from 'file-type';
import sharp, { type Metadata } from 'sharp';
import { AppError } from '../http/errors';

export const IMAGE_TYPES = ['image/jpeg', 'image/png', 'image/webp', 'image/gif'] as const;
export const PDF = 'application/pdf';
export const ACCEPTED_TYPES: readonly string[] = [...IMAGE_TYPES, PDF];
export const THUMBNAIL_PX = 320;
export const THUMBNAIL_TYPE = 'image/webp';

export const EXTENSIONS: Record<string, string> = { 'image/jpeg': 'jpg', 'image/png': 'png', 'image/webp': 'webp', 'image/gif': 'gif', 'application/pdf': 'pdf' };

export interface Prepared {
  bytes: Buffer;
  mediaType: string;
  width: number | null;
  height: number | null;
  thumbnail: Buffer | null;
}

const refused = (message: string, code: string) => new AppError(400, code, message, { field: 'file' });

/** The media type sniffed from the bytes, or null when they are none we know. */
export async function sniff(bytes: Buffer): Promise<string | null> {
  return (await fileTypeFromBuffer(bytes))?.mime ?? null;
}

/** Checks and prepares an upload: throws a 400 naming `file` for what is refused. */
export async function prepareUpload(bytes: Buffer, maxPixels: number): Promise<Prepared> {
  const type = await sniff(bytes);
  if (!type || !ACCEPTED_TYPES.includes(type)) {
    throw refused(
      `This file is ${type ? `of type ${type}` : 'of no type we recognise from its content'}; a template takes JPEG, PNG, WebP or GIF images and PDF documents (the type is read from the content, not the name).`,
      'unsupported-file-type',
    );
  }
  if (type === PDF) return { bytes, mediaType: PDF, width: null, height: null, thumbnail: null };
  return prepareImage(bytes, type, maxPixels);
}

async function prepareImage(bytes: Buffer, type: string, maxPixels: number): Promise<Prepared> {
  // The header alone: no pixel is decoded here.
  let meta: Metadata;
  try {
    meta = await sharp(bytes, { limitInputPixels: false }).metadata();
  } catch {
    throw refused('The image cannot be read: the file is damaged or incomplete.', 'unreadable-image');
  }
  const { width, height } = meta;
  if (!width || !height) throw refused('The image cannot be read: it declares no size.', 'unreadable-image');
  if (width * height > maxPixels) {
    throw refused(
      `The image declares ${width} × ${height} pixels (${((width * height) / 1e6).toFixed(1)} megapixels); the limit is ${(maxPixels / 1e6).toFixed(1)} megapixels.`,
      'image-too-large',
    );
  }
  try {
    // Decoding keeps the limit too; autoOrient applies the orientation tag; no withMetadata/keepExif:
    // the output carries no metadata at all.
    const pipeline = sharp(bytes, { limitInputPixels: maxPixels, failOn: 'error' }).autoOrient();
    const encoded =
      type === 'image/jpeg'
        ? pipeline.jpeg({ quality: 90 })
        : type === 'image/png'
          ? pipeline.png({ compressionLevel: 6 })
          : type === 'image/webp'
            ? pipeline.webp({ quality: 90 })
            : pipeline.gif();
    const out = await encoded.toBuffer({ resolveWithObject: true });
    const thumbnail = await sharp(out.data, { limitInputPixels: maxPixels })
      .resize(THUMBNAIL_PX, THUMBNAIL_PX, { fit: 'inside', withoutEnlargement: true })
      .webp({ quality: 75 })
      .toBuffer();
    return { bytes: out.data, mediaType: type, width: out.info.width, height: out.info.height, thumbnail };
  } catch (e) {
    if (/pixel limit/i.test((e as Error).message)) throw refused(`The image is larger than ${(maxPixels / 1e6).toFixed(1)} megapixels.`, 'image-too-large');
    throw refused('The image cannot be decoded: the file is damaged or incomplete.', 'unreadable-image');
  }
}

/** A file name fit for a header: no path, no control or quote characters, the sniffed extension. */
export function downloadName(originalName: string, mediaType: string): string {
  const base = originalName
    .split(/[\\/]/)
    .pop()!
    .replace(/[\u0000-\u001f\u007f"\\]/g, '')
    .replace(/\.[A-Za-z0-9]{1,5}$/, '')
    .trim()
    .slice(0, 120);
  const ext = EXTENSIONS[mediaType];
  return `${base || 'file'}${ext ? `.${ext}` : ''}`;
}

/** `inline` or `attachment` with an ASCII fallback name and the UTF-8 name (RFC 6266, RFC 8187). */
export function contentDisposition(kind: 'inline' | 'attachment', name: string): string {
  const ascii = name.normalize('NFKD').replace(/[^\x20-\x7e]/g, '_').replace(/["\\%]/g, '_');
  return `${kind}; filename="${ascii}"; filename*=UTF-8''${encodeURIComponent(name).replace(/['()*]/g, (c) => `%${c.charCodeAt(0).toString(16).toUpperCase()}`)}`;
}

