// E-mail rendering: plain text keeps every link; HTML escapes text and makes the links clickable.
import { describe, it, expect } from 'vitest';
import { render } from '../../src/lib/server/mail';

describe('e-mail rendering', () => {
  it('links in paragraphs become anchors in HTML, text stays escaped', () => {
    const m = render({
      to: 'a@test.example',
      subject: 's',
      paragraphs: ['Frame 1003: <too much spray> — http://127.0.0.1:4321/studios/x/versions/7?frame=1003'],
      action: { label: 'Open', url: 'http://127.0.0.1:4321/studios/x/versions/7' },
    });
    expect(m.text).toContain('http://127.0.0.1:4321/studios/x/versions/7?frame=1003');
    expect(m.html).toContain('<a href="http://127.0.0.1:4321/studios/x/versions/7?frame=1003"');
    expect(m.html).toContain('&#60;too much spray&#62;');
    expect(m.html).not.toContain('<too much spray>');
  });
});
