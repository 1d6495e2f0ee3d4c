// The printable inspection log's Print button (a file of our own: the page's CSP allows no inline script).
document.addEventListener('click', (e) => {
  if (e.target instanceof Element && e.target.closest('[data-print]')) window.print();
});
