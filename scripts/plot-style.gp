# plot-style.gp - propbench's look for every report figure: a warm paper
# plot area, a 12-colour palette whose lines also differ by point shape (one
# per method) so they stay apart in greyscale print; dash patterns separate
# the steps or tolerances of one method. Kept equal to bench/report/figure_style.c
# (a test checks); each report copies it to plots/style.gp.
set encoding utf8
set datafile separator ','
set border 3 lw 1.1 lc rgb '#3d3d3d'
set tics nomirror out scale 0.7 textcolor rgb '#2b2b2b'
set mxtics default
set mytics default
# major grid lines only: minor ones on log axes were most of each SVG's size
set grid xtics ytics lw 0.7 lc rgb '#d9d2c3' dt 1
set key outside right top vertical Left reverse noenhanced samplen 4 spacing 1.05 width 1
set key box lw 0.6 lc rgb '#b9b1a0' opaque
set title noenhanced font ',12' textcolor rgb '#1b1b1b'
set object 1 rectangle from graph 0,0 to graph 1,1 behind fc rgb '#fbf8f1' fs solid 1.0 noborder
set linetype 1  lc rgb '#005f73' lw 1.5 pt 7  ps 0.75
set linetype 2  lc rgb '#bb3e03' lw 1.5 pt 4  ps 0.75
set linetype 3  lc rgb '#6a4c93' lw 1.5 pt 9  ps 0.75
set linetype 4  lc rgb '#5a7d1a' lw 1.5 pt 12 ps 0.85
set linetype 5  lc rgb '#1d3557' lw 1.5 pt 5  ps 0.7
set linetype 6  lc rgb '#c9184a' lw 1.5 pt 6  ps 0.75
set linetype 7  lc rgb '#a67c00' lw 1.5 pt 11 ps 0.8
set linetype 8  lc rgb '#3f8fbf' lw 1.5 pt 8  ps 0.8
set linetype 9  lc rgb '#7f5539' lw 1.5 pt 13 ps 0.85
set linetype 10 lc rgb '#2a9d8f' lw 1.5 pt 10 ps 0.8
set linetype 11 lc rgb '#9d4edd' lw 1.5 pt 15 ps 0.85
set linetype 12 lc rgb '#495057' lw 1.5 pt 2  ps 0.8
set linetype cycle 12
# thin companion lines: fitted growth laws and reference slopes
set style line 100 lc rgb '#6b6b6b' lw 0.9 dt (6,4)
pb_font = 'DejaVu Sans,10'
# log axes cannot show zero or negative values: drop them rather than warn
pbpos(y) = (y > 0 ? y : NaN)
