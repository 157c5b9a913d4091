/**
 * A caught mail's HTML as its reader would see it. The frame is sandboxed with no permissions at
 * all: no scripts, no forms, no navigation of this page, and an origin of its own, so whatever a
 * mail carries cannot reach the signed-in app around it.
 */
export function MailHtml({ html, testID }: { html: string; text: string; testID?: string }) {
  return (
    <iframe
      sandbox=""
      srcDoc={html}
      title="The mail as its reader sees it"
      data-testid={testID}
      referrerPolicy="no-referrer"
      style={{ width: '100%', height: 480, border: '1px solid rgba(127,127,127,0.4)', borderRadius: 10, background: '#ffffff' }}
    />
  );
}
