// The printable caregiver sheet: the Print button (no inline script under the CSP).
const button = document.getElementById('print-sheet');
if (button) button.addEventListener('click', () => window.print());
