import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { existsSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import request from 'supertest';
import sharp from 'sharp';
import { PHOTO_MAX_BYTES } from '@shared/protocol/photos';
import { startTestApp, type TestApp } from '../support/app';
import { addVenueWithPeople, signedIn, type Agent } from '../support/people';

/** A camera-like JPEG: 2400 x 1600, with EXIF (a camera make and a place) that must not survive the upload. */
const cameraJpeg = () =>
  sharp({ create: { width: 2400, height: 1600, channels: 3, background: '#884422' } })
    .jpeg()
    .withExif({ IFD0: { Make: 'Pocket Camera', Model: 'X1' }, IFD3: { GPSLatitudeRef: 'N', GPSLatitude: '51/1 30/1 0/1' } })
    .toBuffer();

describe('photos of a hang', () => {
  let t: TestApp;
  let rail: Agent;
  let loader: Agent;
  let lineSet7: number;
  let pieceOn7: number;
  let lineSet12: number;
  const photoDir = () => join(process.cwd(), '.data', 'files', 'photos');
  const rows = async () => Number((await t.database.owner.query('SELECT COUNT(*) AS n FROM photo'))[0].n);

  beforeAll(async () => {
    t = await startTestApp();
    rail = await signedIn(t.url, 'rail@larkspur.example');
    loader = await signedIn(t.url, 'loader1@larkspur.example');
    [{ id: lineSet7 }] = await t.database.owner.query('SELECT id FROM line_set WHERE number = 7');
    [{ id: lineSet12 }] = await t.database.owner.query('SELECT id FROM line_set WHERE number = 12');
    [{ id: pieceOn7 }] = await t.database.owner.query('SELECT id FROM piece WHERE line_set_id = ? ORDER BY id LIMIT 1', [lineSet7]);
  });
  afterAll(async () => { await t.close(); });

  it("shows the demo's own drawings to everyone at the venue", async () => {
    const list = (await loader.get(`/api/line-sets/${lineSet7}/photos`)).body.photos;
    expect(list).toHaveLength(1);
    expect(list[0].caption).toMatch(/drawing/);
    const image = await loader.get(list[0].url).buffer(true);
    expect(image.status).toBe(200);
    expect(image.headers['content-type']).toBe('image/jpeg');
    expect(image.headers['cache-control']).toMatch(/private/);
    expect((await sharp(image.body).metadata()).width).toBe(1200);
    expect((await loader.get(`/api/line-sets/${lineSet12}/photos`)).body.photos).toHaveLength(1);
  });

  it('keeps an upload upright and scaled, with a thumbnail and no metadata, named by the server', async () => {
    const original = await cameraJpeg();
    expect((await sharp(original).metadata()).exif).toBeTruthy();
    const res = await rail.post(`/api/line-sets/${lineSet7}/photos`).field('caption', 'Drape A from the bridge').field('pieceId', String(pieceOn7))
      .attach('photo', original, '../../etc/passwd.jpg');
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.photo).toMatchObject({ caption: 'Drape A from the bridge', pieceId: pieceOn7, width: 2000, height: 1333 });
    const kept = await rail.get(res.body.photo.url).buffer(true);
    const meta = await sharp(kept.body).metadata();
    expect(meta.exif).toBeUndefined();
    expect(meta.width).toBe(2000);
    const thumb = await sharp((await rail.get(res.body.photo.thumbUrl).buffer(true)).body).metadata();
    expect(Math.max(thumb.width!, thumb.height!)).toBe(320);
    // The uploaded name went nowhere: the files are the server's own, inside the photos folder.
    const [row] = await t.database.owner.query('SELECT file_name FROM photo WHERE id = ?', [res.body.photo.id]);
    expect(row.file_name).toMatch(/^[0-9a-f-]{36}\.jpg$/);
    expect(existsSync(join(photoDir(), row.file_name))).toBe(true);
    expect(readdirSync(photoDir()).some((f) => f.includes('passwd'))).toBe(false);
  });

  it('refuses a file that is not an image, whatever its name says, and writes nothing', async () => {
    const before = await rows();
    const res = await rail.post(`/api/line-sets/${lineSet7}/photos`).attach('photo', Buffer.from('%PDF-1.4 not a photo at all'), 'hang.jpg');
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/not a photo/);
    expect(res.body.error.fields.photo).toBeTruthy();
    const html = await rail.post(`/api/line-sets/${lineSet7}/photos`).attach('photo', Buffer.from('<html><script>alert(1)</script></html>'), 'hang.png');
    expect(html.status).toBe(400);
    expect(await rows()).toBe(before);
  });

  it('refuses a photo over the size limit with a message', async () => {
    const before = await rows();
    const big = Buffer.concat([await cameraJpeg(), Buffer.alloc(PHOTO_MAX_BYTES)]);
    const res = await rail.post(`/api/line-sets/${lineSet7}/photos`).attach('photo', big, 'big.jpg');
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/larger than 8 MB/);
    expect(await rows()).toBe(before);
  });

  it('refuses a piece of another line set, a missing file, and a loader', async () => {
    const png = await sharp({ create: { width: 4, height: 4, channels: 3, background: '#000' } }).png().toBuffer();
    expect((await rail.post(`/api/line-sets/${lineSet12}/photos`).field('pieceId', String(pieceOn7)).attach('photo', png, 'x.png')).body.error.fields.pieceId).toBeTruthy();
    expect((await rail.post(`/api/line-sets/${lineSet7}/photos`).field('caption', 'no file')).status).toBe(400);
    expect((await loader.post(`/api/line-sets/${lineSet7}/photos`).attach('photo', png, 'x.png')).status).toBe(403);
  });

  it("serves nothing to another venue: not the list, the image or the thumbnail, and it cannot remove one", async () => {
    const { emails } = await addVenueWithPeople(t.database.owner, 'Quillfield Hall', ['admin', 'rail']);
    const other = await signedIn(t.url, emails.rail);
    expect((await other.get(`/api/line-sets/${lineSet7}/photos`)).status).toBe(404);
    expect((await other.get('/api/photos/1/image')).status).toBe(404);
    expect((await other.get('/api/photos/1/thumb')).status).toBe(404);
    expect((await other.delete('/api/photos/1')).status).toBe(404);
    expect((await request(t.url).get('/api/photos/1/image')).status).toBe(401);
  });

  it('removes a photo with its files', async () => {
    const png = await sharp({ create: { width: 4, height: 4, channels: 3, background: '#fff' } }).png().toBuffer();
    const added = (await rail.post(`/api/line-sets/${lineSet7}/photos`).attach('photo', png, 'x.png')).body.photo;
    const [row] = await t.database.owner.query('SELECT file_name, thumb_name FROM photo WHERE id = ?', [added.id]);
    expect((await rail.delete(`/api/photos/${added.id}`)).status).toBe(204);
    expect(existsSync(join(photoDir(), row.file_name))).toBe(false);
    expect(existsSync(join(photoDir(), row.thumb_name))).toBe(false);
    expect((await rail.get(added.url)).status).toBe(404);
  });
});
