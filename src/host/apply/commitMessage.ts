// The commit message the curator edits before committing label changes. VS Code's input box holds
// one line, so the curator edits the subject and the generated body is kept as it is.

export interface CommitMessageParts {
  subject: string;
  /** Lines after the blank line, without trailing newline; '' when there is none. */
  body: string;
}

export function splitCommitMessage(message: string): CommitMessageParts {
  const normalised = message.replace(/\r\n?/g, '\n');
  const newline = normalised.indexOf('\n');
  if (newline < 0) return { subject: normalised.trim(), body: '' };
  return {
    subject: normalised.slice(0, newline).trim(),
    body: normalised
      .slice(newline + 1)
      .replace(/^\n+/, '')
      .replace(/\s+$/, ''),
  };
}

/** Subject, a blank line, the body; a final newline as git writes it. An empty subject is refused. */
export function joinCommitMessage(subject: string, body: string): string {
  const line = subject.replace(/[\r\n]+/g, ' ').trim();
  if (line.length === 0) throw new Error('the commit message needs a subject line');
  return body.trim().length > 0 ? `${line}\n\n${body.replace(/\s+$/, '')}\n` : `${line}\n`;
}

/** Why a subject typed in the input box is not usable, or null. */
export function subjectProblem(subject: string): string | null {
  if (subject.trim().length === 0) return 'The commit needs a subject line.';
  return null;
}
