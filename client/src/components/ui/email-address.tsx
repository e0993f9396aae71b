/** An e-mail address that may wrap after its "@" (and anywhere only if a part is still too long). */
export function EmailAddress({ email, className }: { email: string; className?: string }) {
  const at = email.lastIndexOf('@');
  return (
    <span className={['[overflow-wrap:anywhere]', className].filter(Boolean).join(' ')}>
      {at <= 0 ? (
        email
      ) : (
        <>
          {email.slice(0, at + 1)}
          <wbr />
          {email.slice(at + 1)}
        </>
      )}
    </span>
  );
}
