# sweep: an amount and the temperature, in text; bad input one line each.
run bath-saline.ionmix
run k-pipette.ionmix
solution egta
add K-gluconate 110
add HEPES 10
add EGTA 10
ph 7.2 with KOH
sweep CaCl2 0 to 9 mM show free Ca points 7 plain
sweep CaCl2 0 to 9 mM show free Ca keep-pH points 7 plain
sweep temp 15 to 35 show ljp k-pipette bath points 5 plain
sweep KCl 2.5 to 20 in bath show nernst K k-pipette bath points 4 plain
sweep NaCl 100 to 150 in bath show erev k-pipette bath K=1 Na=0.05 Cl=0.1 points 3 plain
sweep sucrose 0 to 20 in k-pipette show osmolality points 3 plain
show egta
sweep CaCl2 0 to 0 show free Ca
