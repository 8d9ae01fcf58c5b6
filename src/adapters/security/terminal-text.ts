/**
 * Text that came from outside (a command's output, a file's bytes) made safe to print on a terminal:
 * ANSI / VT escape sequences (CSI, OSC, and two-character ESC sequences) are removed and every other
 * control character except tab and line feed becomes U+FFFD, so a hostile prepare or a binary policy
 * cannot move the cursor, retitle the window, hide lines or fake a verdict. Secrets are redacted too.
 */
import { redactSecrets } from './secrets.ts'

// eslint-disable-next-line no-control-regex
const escapeSequences = /\u001b\[[0-?]*[ -/]*[@-~]|\u001b\][^\u0007\u001b]*(?:\u0007|\u001b\\)?|\u009b[0-?]*[ -/]*[@-~]|\u001b[@-Z\\-_]/g
// eslint-disable-next-line no-control-regex
const otherControls = /[\u0000-\u0008\u000b-\u001f\u007f-\u009f]/g

export function cleanOutsideText(text: string): string {
  return redactSecrets(text.replace(/\r\n/g, '\n').replace(escapeSequences, '').replace(otherControls, '\uFFFD'))
}
