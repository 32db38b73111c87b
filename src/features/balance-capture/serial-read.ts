/**
 * "Read from balance" with Web Serial (Chromium): the user picks the balance's port once per balance (the browser
 * remembers the choice for the page), the port is opened with the settings stored on the balance record, the
 * print command is sent when the record has one, and lines are read until one is a reading (a multi-line print
 * may carry identifier and date lines first) or the time runs out. The raw print goes to the server, which parses
 * it again.
 */
import { parseBalanceLine, parsePrintout, type ParsedPrintout } from '../../../shared/balance/output-line.ts';
import type { Balance } from '../../../shared/schemas/inventory.ts';

/** The part of the Web Serial API used here (Chromium; not in TypeScript's DOM library). */
interface SerialPortLike {
  open(options: { baudRate: number; dataBits?: number; parity?: string; stopBits?: number }): Promise<void>;
  readable: ReadableStream<Uint8Array> | null;
  writable: WritableStream<Uint8Array> | null;
}
interface SerialLike {
  requestPort(options?: unknown): Promise<SerialPortLike>;
}

const serialApi = (): SerialLike | null => ((typeof navigator !== 'undefined' && (navigator as unknown as { serial?: SerialLike }).serial) || null);
export const hasWebSerial = () => serialApi() !== null;

const LINE_ENDINGS = { crlf: '\r\n', cr: '\r', lf: '\n' } as const;
/** One open port per balance for the life of the page. */
const ports = new Map<number, SerialPortLike>();

export type BalancePortSettings = Pick<Balance, 'id' | 'identifier' | 'outputShape' | 'printCommand' | 'serialBaud' | 'serialDataBits' | 'serialParity' | 'serialStopBits' | 'serialLineEnding'>;

/** Reads one print; resolves to the raw text (framing characters removed) and its parse. */
export async function readFromBalance(b: BalancePortSettings, timeoutMs = 8000): Promise<{ raw: string; print: ParsedPrintout }> {
  const serial = serialApi();
  if (!serial) throw new Error('This browser cannot talk to a serial port (Web Serial needs Chrome or Edge). Type the reading, or press Print on a keyboard-output balance.');
  let port = ports.get(b.id);
  if (!port) {
    port = await serial.requestPort();
    await port.open({ baudRate: b.serialBaud ?? 9600, dataBits: b.serialDataBits ?? 8, parity: b.serialParity ?? 'none', stopBits: b.serialStopBits ?? 1 });
    ports.set(b.id, port);
  }
  const ending = LINE_ENDINGS[b.serialLineEnding ?? 'crlf'];
  if (b.printCommand && port.writable) {
    const writer = port.writable.getWriter();
    try {
      await writer.write(new TextEncoder().encode(`${b.printCommand}${ending}`));
    } finally {
      writer.releaseLock();
    }
  }
  if (!port.readable) throw new Error(`The port of ${b.identifier} cannot be read: reconnect the cable and try again.`);
  const reader = port.readable.getReader();
  const decoder = new TextDecoder();
  let text = '';
  const timer = setTimeout(() => void reader.cancel().catch(() => undefined), timeoutMs);
  try {
    for (;;) {
      const { value, done } = await reader.read();
      if (value) text += decoder.decode(value, { stream: true });
      // a complete line that is a reading (or a fault the balance reports) ends the print
      const lines = text.split(/\r\n|\r|\n/);
      const complete = lines.slice(0, -1);
      if (complete.some((l) => parseBalanceLine(l, b.outputShape ?? 'auto').kind !== 'not_a_reading')) break;
      if (done) break;
    }
  } finally {
    clearTimeout(timer);
    reader.releaseLock();
  }
  const raw = text.replace(/[\u0002\u0003]/g, '');
  if (raw.trim() === '') throw new Error(`No reading came from ${b.identifier} within ${timeoutMs / 1000} s: press Print on the balance, or check its port settings.`);
  return { raw, print: parsePrintout(raw, b.outputShape ?? 'auto') };
}
