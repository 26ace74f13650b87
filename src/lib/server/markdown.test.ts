import { describe, expect, it } from 'vitest';
import { renderMarkdown } from './markdown';

// Common practice for user markdown: render, then sanitise; no script, handler or javascript: URL survives.
describe('renderMarkdown', () => {
	it('renders emphasis, code and lists', () => {
		const html = renderMarkdown('The **angle** is `pi/8`:\n\n- should be pi/4');
		expect(html).toContain('<strong>angle</strong>');
		expect(html).toContain('<code>pi/8</code>');
		expect(html).toContain('<li>should be pi/4</li>');
	});
	it('drops scripts, event handlers and javascript: links', () => {
		const html = renderMarkdown('<script>alert(1)</script><img src=x onerror=alert(1)> [x](javascript:alert(1)) <a href="https://example.org" onclick="x()">ok</a>');
		expect(html).not.toMatch(/<script|onerror|onclick|href="javascript:|<img/i);
		expect(html).toContain('href="https://example.org"');
		expect(html).toContain('rel="nofollow noopener noreferrer"');
	});
	it('turns top-level headings into h3 so notes never outrank the page', () => {
		expect(renderMarkdown('# Finding')).toBe('<h3>Finding</h3>');
	});
});
