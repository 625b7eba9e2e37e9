# The review of a deliberately poor pair: untitrated, unbuffered, Ca2+ high.
solution pip
add KCl 140
add CaCl2 0.5
solution bath
add NaCl 100
add KCl 5
add HEPES 10
review pip bath
