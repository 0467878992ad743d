import type { RequestHandler } from 'express';
import multer from 'multer';
import { PHOTO_MAX_BYTES, photoUploadSchema } from '@shared/protocol/photos';
import { HttpError, unauthenticated } from '../../middleware/http-error';
import { route, type RouteSpec } from '../../middleware/routes';
import { idParam } from '../../middleware/validate';
import { tooLarge, type PhotoService } from './photo.service';

/** One file, held in memory up to the limit (so it is checked before anything touches the disk). */
const receive = multer({ storage: multer.memoryStorage(), limits: { fileSize: PHOTO_MAX_BYTES, files: 1, fields: 5 } }).single('photo');
const receivePhoto: RequestHandler = (req, res, next) => {
  // Nobody's upload is read before they are known (the route checks their roles next).
  if (!req.user) return next(unauthenticated());
  receive(req, res, (error: unknown) => {
    if (!error) return next();
    if (error instanceof multer.MulterError) {
      return next(error.code === 'LIMIT_FILE_SIZE' ? tooLarge() : new HttpError('bad-input', 'Send one photo in the field "photo".', { photo: [error.message] }));
    }
    next(error);
  });
};

const EDITORS = { roles: ['admin', 'rail'] } as const;

/** Everyone at the venue sees the photos of its hangs; the director and rail operators add and remove them. */
export function photoRoutes(photos: PhotoService): RouteSpec[] {
  const sendFile = (which: 'image' | 'thumb') =>
    route({
      method: 'get',
      path: `/photos/:id/${which}`,
      access: { roles: 'any' },
      params: idParam,
      async handler({ user, params, res }) {
        const path = await photos.fileOf(user, params.id, which);
        // Private: a shared cache must never hand one venue's photo to another.
        res.setHeader('Cache-Control', 'private, max-age=3600');
        res.type('image/jpeg');
        await new Promise<void>((resolve, reject) => res.sendFile(path, { dotfiles: 'allow' }, (error) => (error ? reject(error) : resolve())));
        return undefined;
      },
    });
  return [
    route({
      method: 'get',
      path: '/line-sets/:id/photos',
      access: { roles: 'any' },
      params: idParam,
      handler: async ({ user, params }) => ({ photos: await photos.list(user, params.id) }),
    }),
    route({
      method: 'post',
      path: '/line-sets/:id/photos',
      access: EDITORS,
      status: 201,
      before: [receivePhoto],
      params: idParam,
      body: photoUploadSchema,
      handler: async ({ user, params, body, req }) => ({ photo: await photos.upload(user, params.id, req.file, body) }),
    }),
    sendFile('image'),
    sendFile('thumb'),
    route({
      method: 'delete',
      path: '/photos/:id',
      access: EDITORS,
      status: 204,
      params: idParam,
      async handler({ user, params, res }) {
        await photos.remove(user, params.id);
        res.status(204).end();
        return undefined;
      },
    }),
  ];
}
