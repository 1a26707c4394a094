// Keyboard for the queue: ArrowDown/j and ArrowUp/k move between rows, Enter opens the focused case.
// Rows are re-rendered by Blazor on every page, so each one is made focusable as it appears.
export function attach(root) {
  const rows = () => [...root.querySelectorAll('tbody tr')].filter(r => r.querySelector('a.claim-link'));
  const mark = () => rows().forEach(r => { if (!r.hasAttribute('tabindex')) r.tabIndex = -1; });
  const observer = new MutationObserver(mark);
  observer.observe(root, { childList: true, subtree: true });
  mark();
  root.dataset.keys = 'on';

  const onKey = e => {
    if (e.ctrlKey || e.metaKey || e.altKey) return;
    // Typing in a filter or search box, or choosing from an open list, must never move the focus.
    if (e.target.closest?.('input, textarea, select, [contenteditable], [role=listbox], .mud-popover')) return;
    const list = rows();
    if (list.length === 0) return;
    const at = list.indexOf(e.target.closest?.('tr'));
    let next;
    if (e.key === 'ArrowDown' || e.key === 'j') next = at < 0 ? 0 : Math.min(at + 1, list.length - 1);
    else if (e.key === 'ArrowUp' || e.key === 'k') next = at < 0 ? 0 : Math.max(at - 1, 0);
    else if (e.key === 'Enter' && at >= 0) {
      e.preventDefault();
      list[at].querySelector('a.claim-link').click();
      return;
    } else return;
    e.preventDefault();
    list[next].focus();
  };
  document.addEventListener('keydown', onKey);
  return { dispose: () => { observer.disconnect(); document.removeEventListener('keydown', onKey); } };
}
