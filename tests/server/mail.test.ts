// E-mail rendering: plain text keeps every link; HTML escapes text and makes the links clickable.
import { describe, it, expect } from 'vitest';
import { render } from '../../src/lib/server/mail';
import { config } from '../../src/lib/server/config';

describe('e-mail rendering', () => {
  it('links into the app in paragraphs become anchors in HTML, text stays escaped', () => {
    // Only links into the app become anchors (a URL someone typed stays text): use the app's own address.
    const app = config.appUrl;
    const m = render({
      to: 'a@test.example',
      subject: 's',
      paragraphs: [`Frame 1003: <too much spray> — ${app}/studios/x/versions/7?frame=1003`],
      action: { label: 'Open', url: `${app}/studios/x/versions/7` },
    });
    expect(m.text).toContain(`${app}/studios/x/versions/7?frame=1003`);
    expect(m.html).toContain(`<a href="${app}/studios/x/versions/7?frame=1003"`);
    expect(m.html).toContain('&#60;too much spray&#62;');
    expect(m.html).not.toContain('<too much spray>');
  });
});
