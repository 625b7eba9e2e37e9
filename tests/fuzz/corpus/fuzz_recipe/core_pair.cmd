# A bath and a pipette solution; show, nernst and the bench sheet.
solution bath
add NaCl 140
add KCl 5
add CaCl2.2H2O 2
add MgCl2.6H2O 1
add HEPES 10
add glucose 10
solution pip
add K-gluconate 135
add KCl 5
add EGTA 1
add MgCl2 2
show pip
nernst pip bath
nernst pip bath activities
activity dh
show bath
solution bath
stock CaCl2.2H2O 1 M
weigh 500 mL
temp 37
nernst pip bath
