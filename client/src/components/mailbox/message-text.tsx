import { Fragment } from 'react';

const URL_PATTERN = /(https?:\/\/[^\s<>"'()[\]]+[^\s<>"'()[\].,;:!?])/g;

/**
 * A plain-text body with its web addresses made into links, so an invitation or password link
 * can be followed from here. Everything else stays text (React escapes it).
 */
export function MessageText({ text }: { text: string }) {
  const parts = text.split(URL_PATTERN);
  return (
    <pre className="whitespace-pre-wrap break-words font-sans text-base leading-relaxed">
      {parts.map((part, index) =>
        index % 2 === 1 ? (
          <a key={index} href={part} className="break-all">
            {part}
          </a>
        ) : (
          <Fragment key={index}>{part}</Fragment>
        ),
      )}
    </pre>
  );
}
