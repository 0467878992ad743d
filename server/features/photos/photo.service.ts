import { randomUUID } from 'node:crypto';
import { existsSync } from 'node:fs';
import { mkdir, rm, writeFile } from 'node:fs/promises';
import { join, resolve } from 'node:path';
import { fileTypeFromBuffer } from 'file-type';
import sharp, { type OutputInfo } from 'sharp';
import type { DataSource } from 'typeorm';
import { PHOTO_MAX_BYTES, PHOTO_MAX_SIDE_PX, THUMB_SIDE_PX, type PhotoView } from '@shared/protocol/photos';
import { HttpError, notFound } from '../../middleware/http-error';
import type { SignedInUser } from '../people/people.service';
import { LineSetRow } from '../schedule/line-set.entity';
import { PieceRow } from '../schedule/piece.entity';
import { ofChosenVenue } from '../venue/venue-access';
import { DRAWINGS } from './drawings';
import { PhotoRow } from './photo.entity';

/** What an upload may be, judged by its first bytes (file-type), never by its name. */
const IMAGE_TYPES = new Set(['image/jpeg', 'image/png', 'image/webp']);

const view = (row: PhotoRow): PhotoView => ({
  id: row.id,
  lineSetId: row.lineSetId,
  pieceId: row.pieceId,
  caption: row.caption,
  width: row.width,
  height: row.height,
  uploadedAtMs: row.uploadedAtMs,
  url: `/api/photos/${row.id}/image`,
  thumbUrl: `/api/photos/${row.id}/thumb`,
});

/**
 * Photos of a hang. Each upload is checked by its content, turned upright, scaled and saved again as
 * JPEG by sharp, which drops every piece of metadata (place, camera, time); a thumbnail is made beside it.
 * Files are named by the server under the data folder; the record goes in MariaDB.
 */
export class PhotoService {
  readonly dir: string;

  constructor(
    private readonly db: DataSource,
    dataDir: string,
  ) {
    this.dir = resolve(dataDir, 'photos');
  }

  private async lineSetOf(user: SignedInUser, lineSetId: number): Promise<LineSetRow> {
    return ofChosenVenue(user, await this.db.getRepository(LineSetRow).findOneBy({ id: lineSetId }), 'That line set');
  }

  async list(user: SignedInUser, lineSetId: number): Promise<PhotoView[]> {
    await this.lineSetOf(user, lineSetId);
    const rows = await this.db.getRepository(PhotoRow).find({ where: { lineSetId, venueId: user.venueId }, order: { id: 'ASC' } });
    return rows.map(view);
  }

  async upload(user: SignedInUser, lineSetId: number, file: Express.Multer.File | undefined, input: { caption: string; pieceId?: number }): Promise<PhotoView> {
    const lineSet = await this.lineSetOf(user, lineSetId);
    if (input.pieceId !== undefined) {
      const piece = await this.db.getRepository(PieceRow).findOneBy({ id: input.pieceId, lineSetId: lineSet.id });
      if (!piece) throw new HttpError('bad-input', 'That piece does not hang on this line set.', { pieceId: ['Not on this line set'] });
    }
    if (!file?.buffer?.length) throw new HttpError('bad-input', 'Choose a photo to upload.', { photo: ['Choose a photo'] });
    if (file.size > PHOTO_MAX_BYTES) throw tooLarge();
    const type = await fileTypeFromBuffer(file.buffer);
    if (!type || !IMAGE_TYPES.has(type.mime)) {
      throw new HttpError('bad-input', 'That file is not a photo Railcall can keep: send a JPEG, PNG or WebP image.', { photo: ['Not a JPEG, PNG or WebP image'] });
    }
    let image: { data: Buffer; info: OutputInfo };
    let thumb: Buffer;
    try {
      const upright = () => sharp(file.buffer, { failOn: 'error' }).rotate();
      image = await upright().resize(PHOTO_MAX_SIDE_PX, PHOTO_MAX_SIDE_PX, { fit: 'inside', withoutEnlargement: true }).jpeg({ quality: 85 }).toBuffer({ resolveWithObject: true });
      thumb = await upright().resize(THUMB_SIDE_PX, THUMB_SIDE_PX, { fit: 'inside', withoutEnlargement: true }).jpeg({ quality: 75 }).toBuffer();
    } catch {
      throw new HttpError('bad-input', 'That image could not be read: it may be damaged. Try another photo.', { photo: ['Cannot be read'] });
    }
    return view(await this.keep({ venueId: user.venueId, lineSetId: lineSet.id, pieceId: input.pieceId ?? null, caption: input.caption, drawn: null, uploadedBy: user.id }, image, thumb));
  }

  private async keep(
    record: Pick<PhotoRow, 'venueId' | 'lineSetId' | 'pieceId' | 'caption' | 'drawn' | 'uploadedBy'>,
    image: { data: Buffer; info: OutputInfo },
    thumb: Buffer,
    names = { fileName: `${randomUUID()}.jpg`, thumbName: `${randomUUID()}-thumb.jpg` },
  ): Promise<PhotoRow> {
    await mkdir(this.dir, { recursive: true });
    await writeFile(join(this.dir, names.fileName), image.data);
    await writeFile(join(this.dir, names.thumbName), thumb);
    try {
      const repo = this.db.getRepository(PhotoRow);
      return await repo.save(repo.create({ ...record, ...names, width: image.info.width, height: image.info.height, bytes: image.data.length, uploadedAtMs: Date.now() }));
    } catch (error) {
      // Nothing half-kept: no record, no files.
      await Promise.all([rm(join(this.dir, names.fileName), { force: true }), rm(join(this.dir, names.thumbName), { force: true })]);
      throw error;
    }
  }

  /** The file of one photo, for a person of its venue only. */
  async fileOf(user: SignedInUser, id: number, which: 'image' | 'thumb'): Promise<string> {
    const row = ofChosenVenue(user, await this.db.getRepository(PhotoRow).findOneBy({ id }), 'That photo');
    const path = join(this.dir, which === 'image' ? row.fileName : row.thumbName);
    if (!existsSync(path)) throw notFound('That photo file');
    return path;
  }

  async remove(user: SignedInUser, id: number): Promise<void> {
    const row = ofChosenVenue(user, await this.db.getRepository(PhotoRow).findOneBy({ id }), 'That photo');
    await this.db.getRepository(PhotoRow).delete({ id: row.id });
    await Promise.all([rm(join(this.dir, row.fileName), { force: true }), rm(join(this.dir, row.thumbName), { force: true })]);
  }

  /** Draws the demo's own photos whose files are not in this data folder yet (a new clone, another folder). */
  async drawMissing(): Promise<void> {
    const rows = await this.db.getRepository(PhotoRow).createQueryBuilder('p').where('p.drawn IS NOT NULL').getMany();
    for (const row of rows) {
      const svg = DRAWINGS[row.drawn!];
      if (!svg || (existsSync(join(this.dir, row.fileName)) && existsSync(join(this.dir, row.thumbName)))) continue;
      await mkdir(this.dir, { recursive: true });
      await writeFile(join(this.dir, row.fileName), await sharp(Buffer.from(svg)).jpeg({ quality: 85 }).toBuffer());
      await writeFile(join(this.dir, row.thumbName), await sharp(Buffer.from(svg)).resize(THUMB_SIDE_PX).jpeg({ quality: 75 }).toBuffer());
    }
  }
}

export const tooLarge = () =>
  new HttpError('bad-input', `That photo is larger than ${PHOTO_MAX_BYTES / 1024 / 1024} MB: send a smaller one.`, { photo: ['Too large'] });
