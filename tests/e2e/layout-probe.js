// Runs inside the page (read as text and passed to page.evaluate, so no build step touches it).
// Scrolls the screen's own scroll view from top to bottom and, at each step, finds every visible text element
// and control whose centre is on screen, then reports:
// - covered: elementFromPoint at its centre is neither the element nor inside it (nor an ancestor that takes
//   the hit for it because the element ignores pointer events);
// - cut off: it sticks out of the window sideways, or out of an ancestor that clips (overflow hidden) rather
//   than scrolls; or the page itself scrolls sideways.
// Content under a pinned bar (sticky or fixed) is not counted as covered: it shows at another scroll position.
// Resolves to a list of readable problem lines, one per element.
async (screenTestId) => {
  const problems = new Map();
  const CONTROL = 'button,a[href],input,textarea,select,[role="button"],[role="link"],[role="checkbox"],[role="radio"],[role="switch"],[role="tab"],[role="combobox"],[role="slider"],[role="textbox"]';
  const describe = (el) => {
    const owner = el.closest('[data-testid]');
    const text = (el.getAttribute('aria-label') || el.textContent || '').replace(/\s+/g, ' ').trim().slice(0, 50);
    return `${el.tagName.toLowerCase()}${owner ? `[${owner.getAttribute('data-testid')}]` : ''} "${text}"`;
  };
  const hasOwnText = (el) => [...el.childNodes].some((n) => n.nodeType === 3 && n.textContent.trim() !== '');
  const isCandidate = (el) => el.matches(CONTROL) || hasOwnText(el);
  const clips = (el) => {
    const s = getComputedStyle(el);
    return s.overflowX !== 'visible' || s.overflowY !== 'visible';
  };
  const pinnedAncestor = (n) => {
    for (let a = n; a && a !== document.body; a = a.parentElement) {
      const p = getComputedStyle(a).position;
      if (p === 'sticky' || p === 'fixed') return a;
    }
    return null;
  };
  const frame = () => new Promise((r) => requestAnimationFrame(() => requestAnimationFrame(r)));

  const vw = document.documentElement.clientWidth;
  if (document.documentElement.scrollWidth > vw + 1) problems.set('page', `the page scrolls sideways (${document.documentElement.scrollWidth} px wide in ${vw} px)`);

  const root = document.querySelector(`[data-testid="${screenTestId}"]`);
  if (!root) return [`no element with testID ${screenTestId}`];
  const scroller = root.scrollHeight > root.clientHeight + 1 ? root : null;
  const step = Math.max(200, Math.floor(root.clientHeight * 0.6));
  const positions = [0];
  if (scroller) for (let y = step; y < scroller.scrollHeight - scroller.clientHeight + step; y += step) positions.push(y);

  for (const y of positions) {
    if (scroller) {
      scroller.scrollTop = y;
      await frame();
    }
    // The whole document: overlays (a notice, the bars) belong to the check as much as the screen does.
    for (const el of document.body.querySelectorAll('*')) {
      if (!isCandidate(el)) continue;
      if (el.closest('[aria-hidden="true"]')) continue;
      if (!el.checkVisibility({ opacityProperty: true, visibilityProperty: true })) continue;
      const r = el.getBoundingClientRect();
      if (r.width < 1 || r.height < 1) continue;
      // Visible part: the window, then every clipping ancestor's box.
      let left = Math.max(r.left, 0), right = Math.min(r.right, window.innerWidth);
      let top = Math.max(r.top, 0), bottom = Math.min(r.bottom, window.innerHeight);
      let cutBy = null;
      if (r.right > window.innerWidth + 1 || r.left < -1) cutBy = 'the window';
      for (let a = el.parentElement; a && a !== document.body; a = a.parentElement) {
        if (!clips(a)) continue;
        const ar = a.getBoundingClientRect();
        const s = getComputedStyle(a);
        const scrollsX = s.overflowX === 'auto' || s.overflowX === 'scroll';
        if (!scrollsX && !cutBy && (r.right > ar.right + 1 || r.left < ar.left - 1) && ar.width > 0) cutBy = describe(a);
        left = Math.max(left, ar.left);
        right = Math.min(right, ar.right);
        top = Math.max(top, ar.top);
        bottom = Math.min(bottom, ar.bottom);
      }
      const cx = r.left + r.width / 2, cy = r.top + r.height / 2;
      // Not on screen at this scroll position. A centre within a pixel of the edge belongs to the neighbour (the bar
      // below): elementFromPoint rounds fractional coordinates.
      if (cx <= left + 1 || cx >= right - 1 || cy <= top + 1 || cy >= bottom - 1) continue;
      // Intentional one-line truncation (numberOfLines) is an ellipsis, not a cut.
      if (cutBy && getComputedStyle(el).textOverflow !== 'ellipsis') problems.set(el, `${describe(el)} is cut off sideways by ${cutBy}`);
      const hit = document.elementFromPoint(cx, cy);
      if (!hit || hit === el || el.contains(hit) || hit.contains(el)) continue;
      // Content scrolling under a pinned bar (position sticky or fixed) is hidden there by design and shows at the
      // next scroll position; the bar itself is checked like any element.
      if (pinnedAncestor(hit) && !pinnedAncestor(hit).contains(el)) continue;
      // SVG text inside the same chart may sit on its own gridlines by design.
      if (el instanceof SVGElement && hit instanceof SVGElement && el.ownerSVGElement === hit.ownerSVGElement) continue;
      problems.set(el, `${describe(el)} is covered by ${describe(hit)}`);
    }
  }
  if (scroller) scroller.scrollTop = 0;
  return [...problems.values()];
}
