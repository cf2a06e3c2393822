import { describe, expect, it } from 'vitest';
import EmailAddress from '@/components/EmailAddress.vue';
import { renderHtml } from './render';

describe('an e-mail address in a narrow column', () => {
  it('may wrap before the "@" and each dot of the domain, and reads as the address itself', async () => {
    const html = await renderHtml(EmailAddress, { address: 'maya.lindqvist@tideway.example' });
    // Vue's server render marks fragments with comments: not part of what shows.
    expect(html.replace(/<!--[^>]*-->/g, '')).toContain('maya.lindqvist<wbr>@tideway<wbr>.example');
    expect(html.replace(/<[^>]+>/g, '')).toBe('maya.lindqvist@tideway.example');
  });

  it('shows anything without an "@" as it is', async () => {
    const html = await renderHtml(EmailAddress, { address: 'not-an-address' });
    expect(html.replace(/<[^>]+>/g, '')).toBe('not-an-address');
    expect(html).not.toContain('<wbr>');
  });
});
