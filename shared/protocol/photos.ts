/** Photos of a hang: what the routes take and answer. */
import { z } from 'zod';

/** Largest photo accepted, in bytes (a phone's full-size JPEG is 3 to 6 MB). */
export const PHOTO_MAX_BYTES = 8 * 1024 * 1024;
/** Longest side of the kept image and of its thumbnail, in pixels. */
export const PHOTO_MAX_SIDE_PX = 2000;
export const THUMB_SIDE_PX = 320;

export const photoUploadSchema = z.object({
  caption: z.string().trim().max(200, 'At most 200 characters').default(''),
  pieceId: z.coerce.number().int().positive().optional(),
});

export interface PhotoView {
  id: number;
  lineSetId: number;
  pieceId: number | null;
  caption: string;
  width: number;
  height: number;
  uploadedAtMs: number;
  /** Same-origin addresses, served only to people of the venue. */
  url: string;
  thumbUrl: string;
}
