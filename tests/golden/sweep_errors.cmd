# sweep: each bad input is one line; the script stops at the first.
solution a
add NaCl 140
sweep NaCl 10 to 5 show pH
