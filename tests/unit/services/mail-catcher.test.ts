import fs from 'node:fs'
import os from 'node:os'
import path from 'node:path'
import nodemailer from 'nodemailer'
import { afterEach, beforeEach, describe, expect, it } from 'vitest'
import { startMailCatcher } from '../../../scripts/fakes/mail-catcher.mjs'

type Caught = { id: string, from: string, to: string[], subject: string, text: string, html: string, date: string }

describe('mail catcher', () => {
  let dir: string
  let catcher: Awaited<ReturnType<typeof startMailCatcher>> | null = null

  beforeEach(() => {
    dir = fs.mkdtempSync(path.join(os.tmpdir(), 'greybody-mail-'))
  })
  afterEach(async () => {
    await catcher?.close()
    catcher = null
    fs.rmSync(dir, { recursive: true, force: true })
  })

  const list = async (query = ''): Promise<Caught[]> => {
    const res = await fetch(`${catcher!.httpUrl}/messages${query}`)
    expect(res.status).toBe(200)
    return (await res.json()) as Caught[]
  }

  it('receives messages sent with nodemailer and lists them newest first over HTTP', async () => {
    catcher = await startMailCatcher({ smtpPort: 0, httpPort: 0, file: path.join(dir, 'mail.jsonl') })
    const transport = nodemailer.createTransport(catcher.smtpUrl)
    await transport.sendMail({
      from: 'Greybody <no-reply@greybody.local>',
      to: 'Owner@Example.test',
      subject: 'Join North Fen Power on Greybody',
      text: 'Follow the link to accept: http://127.0.0.1:3000/invitations/abc',
      html: '<p>Follow the <a href="http://127.0.0.1:3000/invitations/abc">link</a></p>',
    })
    await transport.sendMail({ from: 'no-reply@greybody.local', to: ['crew@example.test', 'viewer@example.test'], subject: 'Second', text: 'two' })

    const all = await list()
    expect(all.map((m) => m.subject)).toEqual(['Second', 'Join North Fen Power on Greybody'])
    const invitation = all[1]!
    expect(invitation.to).toEqual(['owner@example.test'])
    expect(invitation.from).toContain('no-reply@greybody.local')
    expect(invitation.text).toContain('http://127.0.0.1:3000/invitations/abc')
    expect(invitation.html).toContain('<a href="http://127.0.0.1:3000/invitations/abc">')
    expect(Number.isNaN(Date.parse(invitation.date))).toBe(false)

    const forViewer = await list('?to=VIEWER@example.test')
    expect(forViewer.map((m) => m.subject)).toEqual(['Second'])
    expect(forViewer[0]!.to).toEqual(['crew@example.test', 'viewer@example.test'])

    const one = await fetch(`${catcher.httpUrl}/messages/${invitation.id}`)
    expect(((await one.json()) as Caught).subject).toBe('Join North Fen Power on Greybody')
  })

  it('keeps messages across a restart and clears them on DELETE', async () => {
    const file = path.join(dir, 'mail.jsonl')
    catcher = await startMailCatcher({ file })
    await nodemailer.createTransport(catcher.smtpUrl).sendMail({ from: 'a@greybody.local', to: 'keep@example.test', subject: 'Kept', text: 'x' })
    await catcher.close()

    catcher = await startMailCatcher({ file })
    expect((await list()).map((m) => m.subject)).toEqual(['Kept'])

    const del = await fetch(`${catcher.httpUrl}/messages`, { method: 'DELETE' })
    expect(await del.json()).toEqual({ deleted: 1 })
    expect(await list()).toEqual([])
    await catcher.close()
    catcher = await startMailCatcher({ file })
    expect(await list()).toEqual([])
  })
})
