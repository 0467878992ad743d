/** The words of each mail Railcall sends. Plain text: it reads the same on every phone. */

const when = (at: Date) => at.toUTCString().replace('GMT', 'UTC');

export function invitationText(p: { name: string; venueName: string; link: string; expiresAt: Date; invitedBy: string }): { subject: string; text: string } {
  return {
    subject: `Your Railcall invitation to ${p.venueName}`,
    text: [
      `Hello ${p.name},`,
      '',
      `${p.invitedBy} has added you to the fly crew of ${p.venueName} on Railcall.`,
      'Open this link to choose your password and sign in:',
      '',
      p.link,
      '',
      `The link works once and until ${when(p.expiresAt)}. If it has run out, ask your technical director to send a new one.`,
      'If you did not expect this, ignore this message.',
    ].join('\n'),
  };
}

/** To someone who already has an account and was just given roles at one more venue. */
export function venueAddedText(p: { name: string; venueName: string; roles: string[]; addedBy: string }): { subject: string; text: string } {
  return {
    subject: `You are now on the crew of ${p.venueName} in Railcall`,
    text: [
      `Hello ${p.name},`,
      '',
      `${p.addedBy} has added you to the fly crew of ${p.venueName} on Railcall.`,
      `You now hold the roles ${p.roles.join(', ')} at ${p.venueName}.`,
      'Sign in as usual (same e-mail, same password) and pick the venue from the menu.',
      '',
      'If you did not expect this, tell the technical director of that venue.',
    ].join('\n'),
  };
}

export function passwordResetText(p: { name: string; link: string; expiresAt: Date }): { subject: string; text: string } {
  return {
    subject: 'Reset your Railcall password',
    text: [
      `Hello ${p.name},`,
      '',
      'Someone (we hope you) asked to reset your Railcall password. Open this link to choose a new one:',
      '',
      p.link,
      '',
      `The link works once and until ${when(p.expiresAt)}. Your password stays as it is until you choose a new one.`,
      'If you did not ask for this, ignore this message.',
    ].join('\n'),
  };
}

export function sessionReportText(p: { venueName: string; title: string; sentBy: string; note?: string; filename: string }): { subject: string; text: string } {
  return {
    subject: `Session report: ${p.title} (${p.venueName})`,
    text: [
      `${p.sentBy} sends you the report of the loading session "${p.title}" at ${p.venueName}.`,
      ...(p.note ? ['', p.note] : []),
      '',
      `The report is attached (${p.filename}).`,
    ].join('\n'),
  };
}
