import { describe, expect, inject, it } from 'vitest';
import { createHash } from 'node:crypto';
import nodemailer from 'nodemailer';

const catcherUrl = inject('catcherUrl');

describe('the local mail catcher', () => {
  it('receives a message over real SMTP and keeps it with its attachment', async () => {
    const transport = nodemailer.createTransport(inject('smtpUrl'));
    const attachment = Buffer.from('%PDF-1.4 not really a pdf but bytes we can hash');
    const subject = `catcher check ${Date.now()}-${Math.random()}`;
    await transport.sendMail({
      from: 'office@quillmoor.test',
      to: 'someone@example.test',
      subject,
      text: 'Hello from the test',
      attachments: [{ filename: 'report.pdf', content: attachment, contentType: 'application/pdf' }],
    });
    const list = await (await fetch(`${catcherUrl}/messages`)).json();
    const summary = list.find((m: { subject: string }) => m.subject === subject);
    expect(summary).toBeDefined();
    expect(summary.to).toEqual(['someone@example.test']);
    const message = await (await fetch(`${catcherUrl}/messages/${summary.id}`)).json();
    expect(message.text.trim()).toBe('Hello from the test');
    expect(message.attachments[0].filename).toBe('report.pdf');
    expect(message.attachments[0].sha256).toBe(createHash('sha256').update(attachment).digest('hex'));
    const bytes = Buffer.from(
      await (await fetch(`${catcherUrl}/messages/${summary.id}/attachments/0`)).arrayBuffer(),
    );
    expect(bytes.equals(attachment)).toBe(true);
  });

  it('answers 404 for an id that is not a message', async () => {
    expect((await fetch(`${catcherUrl}/messages/..%2F..%2Fetc%2Fpasswd`)).status).toBe(404);
    expect((await fetch(`${catcherUrl}/messages/00000000000000000-none`)).status).toBe(404);
  });
});
