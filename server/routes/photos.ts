import { and, eq } from 'drizzle-orm';
import { Router, type NextFunction, type Request, type Response } from 'express';
import { fileTypeFromBuffer } from 'file-type';
import multer from 'multer';
import { z } from 'zod';
import type { PhotoStored } from '../../shared/schemas/inspection';
import { db } from '../db/client';
import { entrySubmissions, photos } from '../db/schema';
import { requireProject, requireUser } from '../middleware/auth';
import { audit } from '../lib/audit';
import { badRequest, HttpError, notFound } from '../lib/http-error';
import { idParam } from '../lib/params';
import { reply } from '../lib/reply';
import { removeStoredFile, storagePath, storeFile } from '../lib/storage';

export const photosRouter = Router({ mergeParams: true });

export const MAX_PHOTO_BYTES = 10 * 1024 * 1024;
/** Types accepted, by what the bytes are — never by file name or the Content-Type the client claims. */
const allowed = new Map([
  ['image/jpeg', 'jpg'],
  ['image/png', 'png'],
  ['image/webp', 'webp'],
]);

const upload = multer({ storage: multer.memoryStorage(), limits: { fileSize: MAX_PHOTO_BYTES, files: 1, fields: 5 } });

function receivePhoto(req: Request, res: Response, next: NextFunction) {
  upload.single('photo')(req, res, (err: unknown) => {
    if (err instanceof multer.MulterError) {
      next(
        err.code === 'LIMIT_FILE_SIZE'
          ? new HttpError(413, 'The photo is larger than 10 MB. Take it at a lower resolution and try again.')
          : badRequest(`The upload was not understood (${err.message}). Send one photo in the field "photo".`),
      );
    } else if (err instanceof Error && !(err instanceof HttpError)) {
      // Errors of the multipart parser itself (busboy: "Unexpected end of form", "Malformed part
      // header", …) mean the body was cut off or garbled on the way: the sender's fault, not ours.
      next(badRequest(`The photo did not arrive whole (${err.message}). Check the connection and send it again.`));
    } else next(err);
  });
}

const uploadFieldsSchema = z.object({
  entryClientKey: z.uuid({ message: 'entryClientKey must name the position entry the photo belongs to.' }),
  clientKey: z.uuid({ message: 'clientKey must be a UUID.' }),
});

photosRouter.post('/', requireProject('rounds.record'), receivePhoto, async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const me = requireUser(req);
  const fields = uploadFieldsSchema.parse(req.body);
  const [replay] = await db
    .select()
    .from(photos)
    .where(and(eq(photos.projectId, projectId), eq(photos.clientKey, fields.clientKey)));
  if (replay) {
    reply<PhotoStored>(res, 200, replay);
    return;
  }
  if (!req.file) throw badRequest('No photo was attached. Send it in the field "photo".');
  const [entry] = await db
    .select({ id: entrySubmissions.entryId })
    .from(entrySubmissions)
    .where(and(eq(entrySubmissions.projectId, projectId), eq(entrySubmissions.clientKey, fields.entryClientKey)));
  if (!entry) throw notFound('The position entry for this photo');
  const detected = await fileTypeFromBuffer(req.file.buffer);
  const extension = detected && allowed.get(detected.mime);
  if (!detected || !extension) {
    throw new HttpError(
      415,
      `That file is ${detected ? `a ${detected.mime} file` : 'not an image Kerfwise can read'}. Send a JPEG, PNG or WebP photo.`,
    );
  }
  const storedName = await storeFile('photos', extension, req.file.buffer);
  try {
    const photo = await db.transaction(async (tx) => {
      const [row] = await tx
        .insert(photos)
        .values({
          projectId,
          entryId: entry.id,
          clientKey: fields.clientKey,
          storedName,
          mimeType: detected.mime,
          sizeBytes: req.file!.size,
          originalName: req.file!.originalname.slice(0, 200),
          uploadedBy: me.id,
        })
        .returning();
      await audit(tx, {
        userId: me.id,
        projectId,
        entity: 'photo',
        entityId: row.id,
        action: 'create',
        after: { entryId: entry.id, mimeType: row.mimeType, sizeBytes: row.sizeBytes },
      });
      return row;
    });
    reply<PhotoStored>(res, 201, photo);
  } catch (err) {
    await removeStoredFile('photos', storedName);
    throw err;
  }
});

/** Served only to members of the project, with the type Kerfwise detected. */
photosRouter.get('/:photoId', requireProject('rounds.read'), async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const photoId = idParam(req.params, 'photoId', 'That photo');
  const [photo] = await db
    .select()
    .from(photos)
    .where(and(eq(photos.id, photoId), eq(photos.projectId, projectId)));
  if (!photo) throw notFound('That photo');
  res.set({ 'Content-Type': photo.mimeType, 'Cache-Control': 'private, max-age=86400', 'X-Content-Type-Options': 'nosniff' });
  // The storage folder may sit under a dot-folder (.data/ by default).
  res.sendFile(storagePath('photos', photo.storedName), { dotfiles: 'allow' });
});
