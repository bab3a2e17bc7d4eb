import { ValidationError } from '../errors';
import { tooLargeMessage } from './limits';

/*
 * Why an upload was refused. Both are validation errors on the `file` field, so a form shows them
 * beside the picker; the upload route answers 413 and 415 for them (RFC 9110 §15.5.14, §15.5.16).
 */

export class FileTooLargeError extends ValidationError {
  constructor(bytes: number | null) {
    const message = tooLargeMessage(bytes);
    super(message, { file: [message] });
  }
}

export class FileTypeRefusedError extends ValidationError {
  constructor(message: string) {
    super(message, { file: [message] });
  }
}
