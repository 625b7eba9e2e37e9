# Junction, exchange, reversal potentials, ratio and iv on the demo recipes.
run bath-saline.ionmix
run k-pipette.ionmix
junction k-pipette bath model all
junction k-pipette bath activities
solution lowcl from bath
remove NaCl
add Na-gluconate 140
exchange bath lowcl pipette k-pipette
exchange bath lowcl pipette k-pipette bridge KCl 3 M
erev k-pipette bath K=1 Na=0.04 Cl=0.45 corrected
erev k-pipette bath Na=1 K=1.1 Ca=5
ratio k-pipette bath Na K at -40
iv k-pipette bath K=1 Na=0.05 from -100 to 40 step 20 plain
correct value -70 -45.5 for k-pipette bath
junction bath bath
