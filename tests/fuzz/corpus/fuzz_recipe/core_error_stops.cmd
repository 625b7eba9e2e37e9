# A script stops at its first bad line with FILE:LINE, exit status 1.
solution bath
add NaCl 140
add NaCl 12 parsecs
show
