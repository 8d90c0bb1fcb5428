/**
 * Shrinks a photo taken on the tablet to a JPEG data URL small enough to travel with its record: the longest side at
 * most 1280 px, quality lowered (and then the size) until it fits. Browser only (canvas).
 */
import { MAX_PHOTO_DATA_URL, type ValveChange } from '../../schema';

export type RecordPhoto = NonNullable<ValveChange['photo']>;

const ATTEMPTS = [
  { side: 1280, quality: 0.72 },
  { side: 1280, quality: 0.55 },
  { side: 960, quality: 0.55 },
  { side: 720, quality: 0.5 },
];

export async function shrinkPhoto(file: Blob): Promise<RecordPhoto> {
  if (!file.type.startsWith('image/')) {
    throw new Error(
      `That file is ${file.type || 'not an image'}; choose a photo (JPEG, PNG, WebP or HEIC the browser can open).`,
    );
  }
  let bitmap: ImageBitmap;
  try {
    bitmap = await createImageBitmap(file);
  } catch {
    throw new Error('This browser cannot open that photo; take it again with the tablet camera.');
  }
  try {
    for (const attempt of ATTEMPTS) {
      const scale = Math.min(1, attempt.side / Math.max(bitmap.width, bitmap.height));
      const width = Math.max(1, Math.round(bitmap.width * scale));
      const height = Math.max(1, Math.round(bitmap.height * scale));
      const canvas = document.createElement('canvas');
      canvas.width = width;
      canvas.height = height;
      const context = canvas.getContext('2d');
      if (!context) throw new Error('This browser cannot shrink photos (no canvas); save without the photo.');
      context.drawImage(bitmap, 0, 0, width, height);
      const dataUrl = canvas.toDataURL('image/jpeg', attempt.quality);
      if (dataUrl.startsWith('data:image/jpeg;base64,') && dataUrl.length <= MAX_PHOTO_DATA_URL) {
        return { mediaType: 'image/jpeg', dataUrl, widthPx: width, heightPx: height };
      }
    }
  } finally {
    bitmap.close();
  }
  throw new Error('The photo stays too large even when shrunk; take a closer, plainer picture.');
}
