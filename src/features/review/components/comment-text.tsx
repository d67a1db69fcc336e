import type { MentionCandidate } from '@/features/review/components/comment-box';

const escapeRegExp = (s: string) => s.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');

/** A comment body as text with its line breaks, mentions of members set in bold; never parsed as HTML. */
export function CommentText({ body, members }: { body: string; members: MentionCandidate[] }) {
  const names = members.map((m) => m.name).sort((a, b) => b.length - a.length);
  const parts = names.length > 0 ? body.split(new RegExp(`(@(?:${names.map(escapeRegExp).join('|')}))`, 'u')) : [body];
  return (
    <p className="text-sm break-words whitespace-pre-wrap text-ink">
      {parts.map((part, index) => (index % 2 === 1 ? <strong key={index} className="text-teal">{part}</strong> : part))}
    </p>
  );
}
