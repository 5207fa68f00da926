import { AppError } from '../http/errors';
import { MAX_FILE_BYTES } from './reader';

/** 413: the upload is over the size limit (said before reading it when Content-Length tells). */
export const fileTooLarge = (bytes: number) =>
  new AppError(
    413,
    'file_too_large',
    `This file is ${(bytes / 1024 / 1024).toFixed(1)} MB; the limit is ${MAX_FILE_BYTES / 1024 / 1024} MB. Split the register (for example one file per school) or remove pictures and other sheets, then upload it again.`,
    { maxBytes: MAX_FILE_BYTES, bytes },
  );

/** 400: the multipart form has no file in the `file` field. */
export const fileMissing = () =>
  new AppError(
    400,
    'file_missing',
    'Choose a register file (.xlsx or .csv) to upload; send it in the form field "file".',
  );

/** 404: the import rejected no rows, so there is no rejected-rows workbook. */
export const noRejectedRows = () =>
  new AppError(404, 'not_found', 'That import rejected no rows, so there is nothing to download.');
