// The words of every e-mail Greybody sends. Plain, useful, in our own voice, with a link into the app.
const esc = (s: string) => s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!)

function layout(title: string, paragraphs: string[], action: { label: string; url: string }, footer: string) {
  const text = [title, '', ...paragraphs, '', `${action.label}: ${action.url}`, '', footer].join('\n')
  const html = `<!doctype html><html><body style="font-family:Manrope,Arial,sans-serif;color:#1c1917;background:#f5f5f4;padding:24px">
<div style="max-width:520px;margin:auto;background:#fff;border-radius:12px;padding:24px">
<p style="font-weight:700;font-size:18px;margin:0 0 12px">${esc(title)}</p>
${paragraphs.map((p) => `<p style="line-height:1.5">${esc(p)}</p>`).join('\n')}
<p><a href="${esc(action.url)}" style="display:inline-block;background:#292524;color:#fff;padding:10px 16px;border-radius:8px;text-decoration:none">${esc(action.label)}</a></p>
<p style="font-size:12px;color:#57534e">${esc(footer)}</p></div></body></html>`
  return { text, html }
}

/** The invitation e-mail. */
export function invitationEmail(p: { orgName: string; inviterName: string; role: string; url: string; expiresAt: Date }) {
  const subject = `${p.inviterName} invited you to ${p.orgName} on Greybody`
  return {
    subject,
    ...layout(
      `Join ${p.orgName} on Greybody`,
      [
        `${p.inviterName} has invited you to the ${p.orgName} infrared inspection programme as ${p.role}.`,
        `The link works until ${p.expiresAt.toUTCString()}. If you do not have a Greybody account yet, you can create one from the link.`,
      ],
      { label: 'Accept the invitation', url: p.url },
      'If you did not expect this, you can ignore this message; nothing happens unless you follow the link.',
    ),
  }
}

/** The password reset e-mail. */
export function passwordResetEmail(p: { name: string; url: string; minutes: number }) {
  return {
    subject: 'Reset your Greybody password',
    ...layout(
      'Choose a new password',
      [`Hello ${p.name}, someone (hopefully you) asked to reset the password of this Greybody account.`, `The link works once, for ${p.minutes} minutes.`],
      { label: 'Choose a new password', url: p.url },
      'If you did not ask for this, ignore this message: your password stays as it is.',
    ),
  }
}
